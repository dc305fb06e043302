from jinja2.runtime import LoopContext, Macro, Markup, Namespace, TemplateNotFound, TemplateReference, TemplateRuntimeError, Undefined, escape, identity, internalcode, markup_join, missing, str_join
name = 'derivation.md.j2'

def root(context, missing=missing):
    resolve = context.resolve_or_missing
    undefined = environment.undefined
    concat = environment.concat
    cond_expr_undefined = Undefined
    if 0: yield None
    l_0_title = resolve('title')
    l_0_file = resolve('file')
    l_0_verdicts = resolve('verdicts')
    l_0_diagnostics = resolve('diagnostics')
    l_0_primal = resolve('primal')
    l_0_lagrangian = resolve('lagrangian')
    l_0_steps = resolve('steps')
    l_0_unbounded = resolve('unbounded')
    l_0_dual = resolve('dual')
    l_0_kkt = resolve('kkt')
    l_0_recovery = resolve('recovery')
    l_0_notes = resolve('notes')
    l_0_caution = resolve('caution')
    pass
    yield '# '
    yield str((undefined(name='title') if l_0_title is missing else l_0_title))
    yield '\n'
    if (undefined(name='file') if l_0_file is missing else l_0_file):
        pass
        yield '\nSource: `'
        yield str((undefined(name='file') if l_0_file is missing else l_0_file))
        yield '`\n'
    if (undefined(name='verdicts') if l_0_verdicts is missing else l_0_verdicts):
        pass
        yield '\n## Verdicts\n'
        for l_1_row in (undefined(name='verdicts') if l_0_verdicts is missing else l_0_verdicts):
            _loop_vars = {}
            pass
            yield '\n'
            yield str(l_1_row)
            yield '\n'
        l_1_row = missing
    if (undefined(name='diagnostics') if l_0_diagnostics is missing else l_0_diagnostics):
        pass
        yield '\n## Lint findings\n\n'
        for l_1_row in (undefined(name='diagnostics') if l_0_diagnostics is missing else l_0_diagnostics):
            _loop_vars = {}
            pass
            yield str(l_1_row)
            yield '\n'
        l_1_row = missing
    yield '\n## Problem\n\n'
    yield str((undefined(name='primal') if l_0_primal is missing else l_0_primal))
    yield '\n'
    if (undefined(name='lagrangian') if l_0_lagrangian is missing else l_0_lagrangian):
        pass
        yield '\n## Lagrangian\n\n'
        yield str((undefined(name='lagrangian') if l_0_lagrangian is missing else l_0_lagrangian))
        yield '\n'
    if (undefined(name='steps') if l_0_steps is missing else l_0_steps):
        pass
        yield '\n## Derivation\n'
        l_1_loop = missing
        for l_1_step, l_1_loop in LoopContext((undefined(name='steps') if l_0_steps is missing else l_0_steps), undefined):
            _loop_vars = {}
            pass
            yield '\n'
            yield str(environment.getattr(l_1_loop, 'index'))
            yield '. '
            yield str(environment.getattr(l_1_step, 'text'))
            yield '\n'
            if environment.getattr(l_1_step, 'math'):
                pass
                yield '\n'
                yield str(environment.getattr(l_1_step, 'math'))
                yield '\n'
        l_1_loop = l_1_step = missing
    yield '\n## Dual problem\n\n'
    if (undefined(name='unbounded') if l_0_unbounded is missing else l_0_unbounded):
        pass
        yield str((undefined(name='unbounded') if l_0_unbounded is missing else l_0_unbounded))
        yield '\n'
    else:
        pass
        yield str((undefined(name='dual') if l_0_dual is missing else l_0_dual))
        yield '\n'
    if (undefined(name='kkt') if l_0_kkt is missing else l_0_kkt):
        pass
        yield '\n## KKT conditions\n'
        for l_1_group in (undefined(name='kkt') if l_0_kkt is missing else l_0_kkt):
            _loop_vars = {}
            pass
            yield '\n'
            yield str(environment.getattr(l_1_group, 'group'))
            yield ':\n'
            if environment.getattr(l_1_group, 'math'):
                pass
                yield '\n'
                yield str(environment.getattr(l_1_group, 'math'))
                yield '\n'
            for l_2_statement in environment.getattr(l_1_group, 'statements'):
                _loop_vars = {}
                pass
                yield '\n'
                yield str(l_2_statement)
                yield '.\n'
            l_2_statement = missing
        l_1_group = missing
    if (undefined(name='recovery') if l_0_recovery is missing else l_0_recovery):
        pass
        yield '\n## Recovering the primal solution\n'
        for l_1_item in (undefined(name='recovery') if l_0_recovery is missing else l_0_recovery):
            _loop_vars = {}
            pass
            if environment.getattr(l_1_item, 'math'):
                pass
                yield '\n'
                yield str(environment.getattr(l_1_item, 'math'))
                yield '\n'
            if environment.getattr(l_1_item, 'note'):
                pass
                yield '\n'
                yield str(environment.getattr(l_1_item, 'note'))
                yield '\n'
        l_1_item = missing
    if (undefined(name='notes') if l_0_notes is missing else l_0_notes):
        pass
        yield '\n## Notes\n'
        for l_1_note in (undefined(name='notes') if l_0_notes is missing else l_0_notes):
            _loop_vars = {}
            pass
            yield '\n'
            yield str(l_1_note)
            yield '\n'
        l_1_note = missing
    yield '\n## Caution\n\n'
    yield str((undefined(name='caution') if l_0_caution is missing else l_0_caution))
    yield '\n'

blocks = {}
debug_info = '1=25&2=27&4=30&6=32&9=35&11=39&14=42&18=45&19=48&25=52&26=54&30=57&32=59&35=63&37=67&38=71&40=74&47=78&48=80&50=84&52=86&55=89&57=93&58=95&60=98&62=100&64=104&68=108&71=111&72=114&74=117&76=119&78=122&82=125&85=128&87=132&93=136'