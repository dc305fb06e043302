from jinja2.runtime import LoopContext, Macro, Markup, Namespace, TemplateNotFound, TemplateReference, TemplateRuntimeError, Undefined, escape, identity, internalcode, markup_join, missing, str_join
name = 'derivation.txt.j2'

def root(context, missing=missing):
    resolve = context.resolve_or_missing
    undefined = environment.undefined
    concat = environment.concat
    cond_expr_undefined = Undefined
    if 0: yield None
    l_0_title = resolve('title')
    l_0_file = resolve('file')
    l_0_verdicts = resolve('verdicts')
    l_0_heading = resolve('heading')
    l_0_diagnostics = resolve('diagnostics')
    l_0_primal = resolve('primal')
    l_0_lagrangian = resolve('lagrangian')
    l_0_steps = resolve('steps')
    l_0_unbounded = resolve('unbounded')
    l_0_indent = resolve('indent')
    l_0_dual = resolve('dual')
    l_0_kkt = resolve('kkt')
    l_0_recovery = resolve('recovery')
    l_0_notes = resolve('notes')
    l_0_caution = resolve('caution')
    pass
    yield str((undefined(name='title') if l_0_title is missing else l_0_title))
    yield str((str_join(('  (', (undefined(name='file') if l_0_file is missing else l_0_file), ')', )) if (undefined(name='file') if l_0_file is missing else l_0_file) else ''))
    yield '\n\n'
    if (undefined(name='verdicts') if l_0_verdicts is missing else l_0_verdicts):
        pass
        yield str(context.call((undefined(name='heading') if l_0_heading is missing else l_0_heading), 'Verdicts'))
        yield '\n'
        for l_1_row in (undefined(name='verdicts') if l_0_verdicts is missing else l_0_verdicts):
            _loop_vars = {}
            pass
            yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
            yield str(l_1_row)
            yield '\n'
        l_1_row = missing
        yield '\n'
    if (undefined(name='diagnostics') if l_0_diagnostics is missing else l_0_diagnostics):
        pass
        yield str(context.call((undefined(name='heading') if l_0_heading is missing else l_0_heading), 'Diagnostics'))
        yield '\n'
        for l_1_row in (undefined(name='diagnostics') if l_0_diagnostics is missing else l_0_diagnostics):
            _loop_vars = {}
            pass
            yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
            yield str(l_1_row)
            yield '\n'
        l_1_row = missing
        yield '\n'
    yield str(context.call((undefined(name='heading') if l_0_heading is missing else l_0_heading), 'Problem'))
    yield '\n'
    for l_1_row in (undefined(name='primal') if l_0_primal is missing else l_0_primal):
        _loop_vars = {}
        pass
        yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
        yield str(l_1_row)
        yield '\n'
    l_1_row = missing
    yield '\n'
    if (undefined(name='lagrangian') if l_0_lagrangian is missing else l_0_lagrangian):
        pass
        yield str(context.call((undefined(name='heading') if l_0_heading is missing else l_0_heading), 'Lagrangian'))
        yield '\n'
        for l_1_row in (undefined(name='lagrangian') if l_0_lagrangian is missing else l_0_lagrangian):
            _loop_vars = {}
            pass
            yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
            yield str(l_1_row)
            yield '\n'
        l_1_row = missing
        yield '\n'
    if (undefined(name='steps') if l_0_steps is missing else l_0_steps):
        pass
        yield str(context.call((undefined(name='heading') if l_0_heading is missing else l_0_heading), 'Derivation'))
        yield '\n'
        for l_1_step in (undefined(name='steps') if l_0_steps is missing else l_0_steps):
            _loop_vars = {}
            pass
            for l_2_line in environment.getattr(l_1_step, 'text'):
                _loop_vars = {}
                pass
                yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
                yield str(l_2_line)
                yield '\n'
            l_2_line = missing
            for l_2_row in environment.getattr(l_1_step, 'rows'):
                _loop_vars = {}
                pass
                yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
                yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
                yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
                yield str(l_2_row)
                yield '\n'
            l_2_row = missing
        l_1_step = missing
        yield '\n'
    yield str(context.call((undefined(name='heading') if l_0_heading is missing else l_0_heading), 'Dual problem'))
    yield '\n'
    if (undefined(name='unbounded') if l_0_unbounded is missing else l_0_unbounded):
        pass
        yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
        yield str((undefined(name='unbounded') if l_0_unbounded is missing else l_0_unbounded))
        yield '\n'
    else:
        pass
        for l_1_row in (undefined(name='dual') if l_0_dual is missing else l_0_dual):
            _loop_vars = {}
            pass
            yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
            yield str(l_1_row)
            yield '\n'
        l_1_row = missing
    if (undefined(name='kkt') if l_0_kkt is missing else l_0_kkt):
        pass
        yield '\n'
        yield str(context.call((undefined(name='heading') if l_0_heading is missing else l_0_heading), 'KKT conditions'))
        yield '\n'
        for l_1_group in (undefined(name='kkt') if l_0_kkt is missing else l_0_kkt):
            _loop_vars = {}
            pass
            yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
            yield str(environment.getattr(l_1_group, 'group'))
            yield '\n'
            for l_2_row in environment.getattr(l_1_group, 'rows'):
                _loop_vars = {}
                pass
                yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
                yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
                yield str(l_2_row)
                yield '\n'
            l_2_row = missing
        l_1_group = missing
    if (undefined(name='recovery') if l_0_recovery is missing else l_0_recovery):
        pass
        yield '\n'
        yield str(context.call((undefined(name='heading') if l_0_heading is missing else l_0_heading), 'Recovering the primal solution'))
        yield '\n'
        for l_1_row in (undefined(name='recovery') if l_0_recovery is missing else l_0_recovery):
            _loop_vars = {}
            pass
            yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
            yield str(l_1_row)
            yield '\n'
        l_1_row = missing
    if (undefined(name='notes') if l_0_notes is missing else l_0_notes):
        pass
        yield '\n'
        yield str(context.call((undefined(name='heading') if l_0_heading is missing else l_0_heading), 'Notes'))
        yield '\n'
        for l_1_note in (undefined(name='notes') if l_0_notes is missing else l_0_notes):
            _loop_vars = {}
            pass
            yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
            yield str(l_1_note)
            yield '\n'
        l_1_note = missing
    yield '\n'
    yield str(context.call((undefined(name='heading') if l_0_heading is missing else l_0_heading), 'Caution'))
    yield '\n'
    for l_1_line in (undefined(name='caution') if l_0_caution is missing else l_0_caution):
        _loop_vars = {}
        pass
        yield str((undefined(name='indent') if l_0_indent is missing else l_0_indent))
        yield str(l_1_line)
        yield '\n'
    l_1_line = missing

blocks = {}
debug_info = '1=26&3=29&4=31&5=33&6=36&10=41&11=43&12=45&13=48&17=53&18=55&19=58&22=63&23=65&24=67&25=70&29=75&30=77&31=79&32=82&33=85&35=89&36=92&41=100&42=102&43=104&45=109&46=112&49=116&51=119&52=121&53=124&54=127&55=130&59=136&61=139&62=141&63=144&66=148&68=151&69=153&70=156&74=161&75=163&76=166'