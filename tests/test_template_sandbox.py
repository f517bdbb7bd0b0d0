"""Templates in a sandbox: a project's own template cannot reach the machine.

The attacks are the usual server-side template injection chains against Jinja (attribute
chains from a global or a handed-in object to ``os``, ``__globals__``, ``__subclasses__``),
each of which runs a command or reads a file in an unsandboxed environment.  Each must end
in a located input error (template file and line) and leave no trace on the machine.
"""
from __future__ import annotations

import pytest

from specgen.errors import InputErrors
from specgen.report.render import template_env
from specgen.templating import project_template_errors

FIX_SANDBOX = ("Fix: use only the values the page hands the template (see the template of the "
               "same name in specgen's content/templates); templates cannot reach Python "
               "internals, files or commands.")


def attacks(marker):
    """(name, template line) pairs; each would touch ``marker`` outside a sandbox."""
    cmd = f"touch {marker}"
    return [
        ("cycler globals", f"{{{{ cycler.__init__.__globals__.os.system('{cmd}') }}}}"),
        ("joiner globals", f"{{{{ joiner.__init__.__globals__.os.popen('{cmd}').read() }}}}"),
        ("namespace globals", f"{{{{ namespace.__init__.__globals__.sys.modules.os.system("
                              f"'{cmd}') }}}}"),
        ("subclasses from a string", "{{ ''.__class__.__mro__[1].__subclasses__() }}"),
        ("subclasses from a project object",
         "{{ project.__class__.__mro__[-1].__subclasses__() }}"),
        ("globals of a filter", f"{{{{ (num.__globals__['__builtins__']['__import__']('os'))"
                                f".system('{cmd}') }}}}"),
        ("attribute by name", "{{ project|attr('__class__')|attr('__init__')"
                              "|attr('__globals__') }}"),
        ("format string", "{{ '{0.__class__.__init__.__globals__}'.format(project) }}"),
        ("self reference", "{{ self._TemplateReference__context.cycler.__init__.__globals__ }}"),
        ("request-style builtins", "{{ lipsum.__globals__['os'].popen('id').read() }}"),
    ]


def project_with_template(tmp_path, body: str):
    root = tmp_path / "project"
    (root / "templates").mkdir(parents=True)
    (root / "templates" / "scope.md.j2").write_text("# Scope\n\nIntro line.\n" + body + "\n",
                                                   encoding="utf-8")
    return root


def render_scope(root, **ctx):
    env = template_env(root)
    with project_template_errors(root):
        return env.get_template("scope.md.j2").render(**ctx)


@pytest.mark.parametrize("name, body", attacks("MARKER"), ids=[a[0] for a in attacks("M")])
def test_template_attack_is_refused_at_its_line(tmp_path, name, body):
    marker = tmp_path / "pwned"
    body = body.replace("MARKER", str(marker))
    root = project_with_template(tmp_path, body)
    with pytest.raises(InputErrors) as err:
        render_scope(root, project=object(), title="Scope")
    (problem,) = err.value.problems
    assert problem.file == "templates/scope.md.j2"
    assert problem.line == 4, str(problem)  # the attack is on the template's fourth line
    text = str(problem)
    assert text.startswith("templates/scope.md.j2, line 4: "), text
    assert ("may not do" in text and text.endswith(FIX_SANDBOX)) or "does not hand it" in text
    assert not marker.exists(), "the template ran a command"


def test_cycler_attack_message_word_for_word(tmp_path):
    root = project_with_template(tmp_path, "{{ cycler.__init__.__globals__.os.system('id') }}")
    with pytest.raises(InputErrors) as err:
        render_scope(root)
    assert str(err.value.problems[0]) == (
        "templates/scope.md.j2, line 4: the template tried something templates may not do "
        "(access to attribute '__init__' of 'StrictUndefined' object is unsafe). " + FIX_SANDBOX)


def test_only_what_specgen_hands_is_global(tmp_path):
    env = template_env(tmp_path)
    assert set(env.globals) == {"namespace"}  # no cycler, joiner, lipsum, range, dict


def test_handed_objects_cannot_be_changed(tmp_path):
    root = project_with_template(tmp_path, "{{ rows.append('x') }}")
    rows = ["a"]
    with pytest.raises(InputErrors) as err:
        render_scope(root, rows=rows)
    assert rows == ["a"]
    assert err.value.problems[0].line == 4


@pytest.mark.parametrize("body, words", [
    ("{{ 9 ** 9 ** 9 }}", "a power this large is not allowed in a template"),
    ("{{ 'x' * 100000000 }}", "repeating text or a list this many times is not allowed"),
    ("{{ 1 / 0 }}", "the template failed: ZeroDivisionError: division by zero."),
    ("{{ nothing_here }}", "'nothing_here' is undefined: the template uses a name the page"),
    ("{% for x in %}", "is not a valid template: Expected an expression, got 'end of statement"),
])
def test_exhausting_or_broken_templates_are_input_errors(tmp_path, body, words):
    root = project_with_template(tmp_path, body)
    with pytest.raises(InputErrors) as err:
        render_scope(root)
    assert err.value.problems[0].line == 4
    assert words in str(err.value.problems[0])


def test_our_templates_keep_rendering_counters(tmp_path):
    """The sandbox still allows what our templates use (namespace counters, loops)."""
    root = project_with_template(
        tmp_path, "{% set n = namespace(i=0) %}{% for x in xs %}{% set n.i = n.i + 1 %}"
                  "{% endfor %}{{ n.i }} {{ 2 ** 10 }} {{ 'ab' * 3 }}")
    assert render_scope(root, xs=[1, 2, 3]).endswith("3 1024 ababab\n")


def test_build_render_stage_reports_a_project_template_attack(demo_copy, monkeypatch, tmp_path):
    """The render stage itself turns the attack into an input error (one chapter rendered,
    to keep the test fast)."""
    import specgen.report.render as render_mod
    from specgen.checks.run import evaluate
    from specgen.build import load as load_project  # as every command reads a project
    marker = tmp_path / "pwned"
    (demo_copy / "templates").mkdir()
    (demo_copy / "templates" / "scope.md.j2").write_text(
        f"# Scope\n\n{{{{ cycler.__init__.__globals__.os.system('touch {marker}') }}}}\n")
    project = load_project(demo_copy)
    results = evaluate(project)
    scope = [c for c in render_mod.chapters() if c.path == "scope.md"]
    monkeypatch.setattr(render_mod, "chapters", lambda: scope)
    with pytest.raises(InputErrors) as err:
        render_mod.render(project, results)
    assert str(err.value.problems[0]).startswith("templates/scope.md.j2, line 3: the template "
                                                 "tried something templates may not do")
    assert not marker.exists()
