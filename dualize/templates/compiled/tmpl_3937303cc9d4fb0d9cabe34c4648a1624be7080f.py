from jinja2.runtime import LoopContext, Macro, Markup, Namespace, TemplateNotFound, TemplateReference, TemplateRuntimeError, Undefined, escape, identity, internalcode, markup_join, missing, str_join
name = 'solver.py.j2'

def root(context, missing=missing):
    resolve = context.resolve_or_missing
    undefined = environment.undefined
    concat = environment.concat
    cond_expr_undefined = Undefined
    if 0: yield None
    l_0_docstring = resolve('docstring')
    l_0_runtime = resolve('runtime')
    l_0_declarations = resolve('declarations')
    l_0_dims = resolve('dims')
    l_0_scalars = resolve('scalars')
    l_0_functions = resolve('functions')
    l_0_spec = resolve('spec')
    pass
    yield '"""'
    yield str((undefined(name='docstring') if l_0_docstring is missing else l_0_docstring))
    yield '\n"""\n\nimport contextlib\nimport json\nimport os\nimport sys\nfrom dataclasses import dataclass, field\n\nif __name__ == "__main__":  # a process of its own: one BLAS thread unless told otherwise\n    for _variable in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):\n        os.environ.setdefault(_variable, "1")  # see BLAS_THREADS\n\nimport numpy as np  # noqa: E402  (after the thread setting, which numpy reads on import)\nimport scipy.linalg  # noqa: E402\nimport scipy.optimize  # noqa: E402\nimport scipy.sparse  # noqa: E402\nimport scipy.special  # noqa: E402\n\n'
    yield str((undefined(name='runtime') if l_0_runtime is missing else l_0_runtime))
    yield '\n\n\n# ---- the dual of this problem, as printed by dualize ----\n\n'
    yield str((undefined(name='declarations') if l_0_declarations is missing else l_0_declarations))
    yield '\nDIMS = '
    yield str((undefined(name='dims') if l_0_dims is missing else l_0_dims))
    yield '\nSCALARS = '
    yield str((undefined(name='scalars') if l_0_scalars is missing else l_0_scalars))
    yield '  # per part of z: the multipliers, then any epigraph variables\n\n\n'
    yield str((undefined(name='functions') if l_0_functions is missing else l_0_functions))
    yield '\n\n\nSPEC = Spec(\n'
    for (l_1_name, l_1_value) in (undefined(name='spec') if l_0_spec is missing else l_0_spec):
        _loop_vars = {}
        pass
        yield '    '
        yield str(l_1_name)
        yield '='
        yield str(l_1_value)
        yield ',\n'
    l_1_name = l_1_value = missing
    yield ')\n\n\ndef solve(data, tol=1e-9, max_iter=20000):\n    """Solve the dual on ``data`` (a dict of name -> number or nested list); a report dict."""\n    return run(SPEC, data, tol, max_iter)\n\n\ndef main(argv):\n    return command(SPEC, argv)\n\n\nif __name__ == "__main__":\n    sys.exit(main(sys.argv[1:]))\n'

blocks = {}
debug_info = '1=19&20=21&25=23&26=25&27=27&30=29&34=31&35=35'