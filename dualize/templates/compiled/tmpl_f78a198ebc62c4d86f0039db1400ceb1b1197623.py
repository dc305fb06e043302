from jinja2.runtime import LoopContext, Macro, Markup, Namespace, TemplateNotFound, TemplateReference, TemplateRuntimeError, Undefined, escape, identity, internalcode, markup_join, missing, str_join
name = 'derivation.tex.j2'

def root(context, missing=missing):
    resolve = context.resolve_or_missing
    undefined = environment.undefined
    concat = environment.concat
    cond_expr_undefined = Undefined
    if 0: yield None
    l_0_caution_comment = resolve('caution_comment')
    l_0_standalone = resolve('standalone')
    l_0_title = resolve('title')
    l_0_caution = resolve('caution')
    l_0_comment = resolve('comment')
    l_0_primal = resolve('primal')
    l_0_lagrangian = resolve('lagrangian')
    l_0_steps = resolve('steps')
    l_0_unbounded = resolve('unbounded')
    l_0_dual = resolve('dual')
    l_0_kkt = resolve('kkt')
    l_0_recovery = resolve('recovery')
    l_0_verdict = resolve('verdict')
    l_0_witness = resolve('witness')
    l_0_notes = resolve('notes')
    pass
    for l_1_line in (undefined(name='caution_comment') if l_0_caution_comment is missing else l_0_caution_comment):
        _loop_vars = {}
        pass
        yield '% '
        yield str(l_1_line)
        yield '\n'
    l_1_line = missing
    if (undefined(name='standalone') if l_0_standalone is missing else l_0_standalone):
        pass
        yield '\\documentclass{article}\n\\usepackage[utf8]{inputenc}\n\\usepackage{amsmath}\n\\usepackage{amssymb}\n% Room for a line holding a long inline formula, rather than a line past the margin.\n\\setlength{\\emergencystretch}{3em}\n\\begin{document}\n\n\\section*{'
        yield str((undefined(name='title') if l_0_title is missing else l_0_title))
        yield '\\protect\\footnote{'
        yield str((undefined(name='caution') if l_0_caution is missing else l_0_caution))
        yield '}}\n\n'
    else:
        pass
        yield '% '
        yield str((undefined(name='comment') if l_0_comment is missing else l_0_comment))
        yield '\n'
    yield '\\paragraph{Problem.}\n\\[\n'
    yield str((undefined(name='primal') if l_0_primal is missing else l_0_primal))
    yield '\n\\]\n'
    if (undefined(name='lagrangian') if l_0_lagrangian is missing else l_0_lagrangian):
        pass
        yield '\n\\paragraph{Lagrangian.}\n'
        yield str((undefined(name='lagrangian') if l_0_lagrangian is missing else l_0_lagrangian))
        yield '\n'
    if (undefined(name='steps') if l_0_steps is missing else l_0_steps):
        pass
        yield '\n\\paragraph{Derivation.}\n'
        for l_1_step in (undefined(name='steps') if l_0_steps is missing else l_0_steps):
            _loop_vars = {}
            pass
            yield str(environment.getattr(l_1_step, 'text'))
            yield '\n'
            if environment.getattr(l_1_step, 'math'):
                pass
                yield str(environment.getattr(l_1_step, 'math'))
                yield '\n'
            yield '\n'
        l_1_step = missing
    yield '\n\\paragraph{Dual problem.}\n'
    if (undefined(name='unbounded') if l_0_unbounded is missing else l_0_unbounded):
        pass
        yield str((undefined(name='unbounded') if l_0_unbounded is missing else l_0_unbounded))
        yield '\n'
    else:
        pass
        yield '\\[\n'
        yield str((undefined(name='dual') if l_0_dual is missing else l_0_dual))
        yield '\n\\]\n'
    if (undefined(name='kkt') if l_0_kkt is missing else l_0_kkt):
        pass
        yield '\n\\paragraph{KKT conditions.}\n'
        for l_1_group in (undefined(name='kkt') if l_0_kkt is missing else l_0_kkt):
            _loop_vars = {}
            pass
            yield str(environment.getattr(l_1_group, 'group'))
            yield ':\n'
            if environment.getattr(l_1_group, 'math'):
                pass
                yield str(environment.getattr(l_1_group, 'math'))
                yield '\n'
            for l_2_statement in environment.getattr(l_1_group, 'statements'):
                _loop_vars = {}
                pass
                yield str(l_2_statement)
                yield '.\n'
            l_2_statement = missing
        l_1_group = missing
    if (undefined(name='recovery') if l_0_recovery is missing else l_0_recovery):
        pass
        yield '\n\\paragraph{Recovering the primal solution.}\n'
        for l_1_item in (undefined(name='recovery') if l_0_recovery is missing else l_0_recovery):
            _loop_vars = {}
            pass
            if environment.getattr(l_1_item, 'math'):
                pass
                yield str(environment.getattr(l_1_item, 'math'))
                yield '\n'
            if environment.getattr(l_1_item, 'note'):
                pass
                yield str(environment.getattr(l_1_item, 'note'))
                yield '\n\n'
        l_1_item = missing
    if (undefined(name='verdict') if l_0_verdict is missing else l_0_verdict):
        pass
        yield '\n\\paragraph{Convexity.}\n'
        yield str(environment.getattr((undefined(name='verdict') if l_0_verdict is missing else l_0_verdict), 'convexity'))
        yield '\n\n\\paragraph{Strong duality.}\n'
        yield str(environment.getattr((undefined(name='verdict') if l_0_verdict is missing else l_0_verdict), 'strong_duality'))
        yield '\n'
        if (undefined(name='witness') if l_0_witness is missing else l_0_witness):
            pass
            yield 'Witness point: '
            yield str((undefined(name='witness') if l_0_witness is missing else l_0_witness))
            yield '.\n'
    if (undefined(name='notes') if l_0_notes is missing else l_0_notes):
        pass
        yield '\n\\paragraph{Notes.}\n'
        for l_1_note in (undefined(name='notes') if l_0_notes is missing else l_0_notes):
            _loop_vars = {}
            pass
            yield str(l_1_note)
            yield '\n\n'
        l_1_note = missing
    if (undefined(name='standalone') if l_0_standalone is missing else l_0_standalone):
        pass
        yield '\n\\end{document}\n'

blocks = {}
debug_info = '1=26&2=30&4=33&13=36&16=43&20=46&22=48&25=51&27=53&30=56&31=59&32=61&33=63&40=68&41=70&44=75&47=77&50=80&51=83&52=85&53=87&55=89&56=92&60=96&63=99&64=102&65=104&67=106&68=108&73=111&76=114&79=116&80=118&81=121&84=123&87=126&88=129&92=132'