"""Documentation quality, enforced: parameters documented, units stated, doctests run.

The rule comes from the contributor guide (DEVELOPERS.md) and the numpydoc docstring standard
(numpydoc project, "Style guide", https://numpydoc.readthedocs.io/en/latest/format.html):

- every public function and public method of ``screen/`` lists each of its parameters in a
  "Parameters" section;
- in ``screen/models/`` every parameter entry and every "Returns"/"Yields" entry carries its unit
  in brackets (``[K]``, ``[J/(kg K)]``, ``[-]`` for dimensionless, ``[text]``, ``[bool]``,
  ``[object]`` where no unit applies);
- the doctests of every ``screen/models`` module run here, at least one per module;
- the public API of ``screen/__init__.py`` rejects unknown keyword arguments.

The docstrings are read with :mod:`ast` (no import), so a module that fails to import still gets
its documentation checked.
"""

from __future__ import annotations

import ast
import doctest
import importlib
import inspect
import pathlib
import pkgutil
import re

import pytest

import screen
import screen.models

PACKAGE = pathlib.Path(screen.__file__).resolve().parent

# A unit in brackets: "[K]", "[J/(kg K)]", "[-]", "[text]", "[W/K, K]". Preceded by white space or
# the start of a line (so an index such as ``a[0]`` does not count); the content is "-" or holds a
# letter or "%" (so an interval such as ``[0, 1]`` does not count).
_BRACKETS = re.compile(r"(?:^|\s)\[([^\]\n]+)\]", re.M)


def _has_unit(text: str) -> bool:
    return any(content.strip() == "-" or re.search(r"[A-Za-z%]", content)
               for content in _BRACKETS.findall(text))


def _section(doc: str, *titles: str) -> str:
    """Body of the first numpydoc section named in ``titles`` ('' when absent)."""
    for title in titles:
        match = re.search(rf"^{title}\n-+\n(.*?)(?=\n\n[A-Z][A-Za-z ]+\n-+\n|\Z)", doc, re.S | re.M)
        if match:
            return match.group(1)
    return ""


def _entries(body: str) -> list[tuple[str, str]]:
    """Split a section body into (header line, full entry text); headers sit at column 0."""
    entries: list[tuple[str, str]] = []
    for line in body.splitlines():
        if line and not line[0].isspace():
            entries.append((line, line))
        elif entries:
            header, text = entries[-1]
            entries[-1] = (header, text + "\n" + line)
    return entries


def _documented_names(body: str) -> dict[str, str]:
    """Map each name listed in a Parameters body (``x, y : float`` lists two) to its entry."""
    names: dict[str, str] = {}
    for header, text in _entries(body):
        for name in header.split(" : ")[0].split(","):
            names[name.strip().lstrip("*")] = text
    return names


def _public_functions(tree: ast.Module):
    """Top-level public functions and public methods of top-level public classes."""
    for node in tree.body:
        if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)) and not node.name.startswith("_"):
            yield node.name, node
        elif isinstance(node, ast.ClassDef) and not node.name.startswith("_"):
            for item in node.body:
                if isinstance(item, (ast.FunctionDef, ast.AsyncFunctionDef)) and not item.name.startswith("_"):
                    yield f"{node.name}.{item.name}", item


def _parameters(func: ast.FunctionDef) -> list[str]:
    args = func.args
    names = [a.arg for a in args.posonlyargs + args.args + args.kwonlyargs]
    if args.vararg:
        names.append(args.vararg.arg)
    if args.kwarg:
        names.append(args.kwarg.arg)
    return [n for n in names if n not in ("self", "cls")]


def documentation_gaps(source: str, where: str, units: bool) -> list[str]:
    """Every documentation gap of one module's source text, one line each.

    Parameters
    ----------
    source : str
        Python source text of the module. [text]
    where : str
        Label used in the messages (the module path). [text]
    units : bool
        Also require a bracketed unit in every parameter and return entry. [bool]

    Returns
    -------
    list of str
        One message per gap ("no docstring", "parameter not documented", "parameter without a
        description", "no [unit]"). [text]
    """
    gaps: list[str] = []
    tree = ast.parse(source)
    for name, func in _public_functions(tree):
        label = f"{where}:{func.lineno} {name}"
        params = _parameters(func)
        doc = ast.get_docstring(func) or ""
        if not doc:
            if params:
                gaps.append(f"{label}: no docstring")
            continue
        documented = _documented_names(_section(doc, "Parameters"))
        for param in params:
            if param not in documented:
                gaps.append(f"{label}({param}): parameter not documented")
            elif not documented[param].partition("\n")[2].strip():
                gaps.append(f"{label}({param}): parameter without a description")
            elif units and not _has_unit(documented[param]):
                gaps.append(f"{label}({param}): parameter without [unit]")
        if units:
            for header, text in _entries(_section(doc, "Returns", "Yields")):
                if not _has_unit(text):
                    gaps.append(f"{label} returns {header.strip()!r}: no [unit]")
    return gaps


def _modules():
    return sorted(p for p in PACKAGE.rglob("*.py"))


def _relative(path: pathlib.Path) -> str:
    return str(path.relative_to(PACKAGE.parent))


# --- the checker itself can fail -------------------------------------------------------------

BAD_SOURCE = '''
def heat(temperature, mass):
    """Heat.

    Parameters
    ----------
    temperature : float
        Temperature.

    Returns
    -------
    float
        Heat.
    """

def undocumented(x):
    pass

class Vessel:
    def fill(self, volume, *, fraction=1.0):
        """Fill.

        Parameters
        ----------
        volume : float
            Volume. [m^3]
        fraction : float
            Fill fraction, in [0, 1].
        """

def _private(x):
    pass
'''

GOOD_SOURCE = '''
def heat(temperature, mass, *extra, **options):
    """Heat.

    Parameters
    ----------
    temperature, mass : float
        Temperature [K] and mass [kg].
    *extra : tuple
        Ignored. [object]
    **options : dict
        Ignored. [object]

    Returns
    -------
    float
        Heat. [J]
    """
'''


def test_checker_reports_each_kind_of_gap():
    gaps = documentation_gaps(BAD_SOURCE, "bad.py", units=True)
    assert "bad.py:2 heat(temperature): parameter without [unit]" in gaps
    assert "bad.py:2 heat(mass): parameter not documented" in gaps
    assert "bad.py:2 heat returns 'float': no [unit]" in gaps
    assert "bad.py:16 undocumented: no docstring" in gaps
    # "[0, 1]" is an interval, not a unit
    assert "bad.py:20 Vessel.fill(fraction): parameter without [unit]" in gaps
    assert not any("volume" in g or "_private" in g for g in gaps)
    assert len(gaps) == 5
    assert len(documentation_gaps(BAD_SOURCE, "bad.py", units=False)) == 2


def test_checker_wants_a_description():
    source = 'def f(mass):\n    """F.\n\n    Parameters\n    ----------\n    mass : float\n    """\n'
    assert documentation_gaps(source, "f.py", units=False) == [
        "f.py:1 f(mass): parameter without a description"]


def test_checker_accepts_a_complete_docstring():
    assert documentation_gaps(GOOD_SOURCE, "good.py", units=True) == []


# --- the package --------------------------------------------------------------------------

def test_every_public_function_documents_each_parameter():
    gaps = []
    for path in _modules():
        gaps += documentation_gaps(path.read_text(encoding="utf-8"), _relative(path), units=False)
    assert not gaps, f"{len(gaps)} documentation gaps:\n" + "\n".join(gaps)


def test_models_parameters_and_returns_carry_units():
    gaps = []
    for path in sorted((PACKAGE / "models").rglob("*.py")):
        gaps += [g for g in documentation_gaps(path.read_text(encoding="utf-8"), _relative(path),
                                               units=True) if "[unit]" in g]
    assert not gaps, f"{len(gaps)} entries without a unit in brackets:\n" + "\n".join(gaps)


# Parameter names that denote a physical quantity (a heuristic: the name says what it is).
DIMENSIONAL_NAME = re.compile(
    r"temperature|pressure|mass|time|energy|heat|enthalpy|volume|area|diameter|rate|density|"
    r"duration|capacity|height|level|_k$|_s$|_pa$|^ua$")


def dimensional_gaps(source: str, where: str) -> list[str]:
    """Float or array parameters with a physical-quantity name and no bracketed unit.

    Parameters
    ----------
    source : str
        Python source text of the module. [text]
    where : str
        Label used in the messages (the module path). [text]

    Returns
    -------
    list of str
        One message per entry without a unit. [text]
    """
    gaps = []
    for name, func in _public_functions(ast.parse(source)):
        documented = _documented_names(_section(ast.get_docstring(func) or "", "Parameters"))
        for param, text in documented.items():
            kind = text.split("\n")[0].partition(" : ")[2]
            if (DIMENSIONAL_NAME.search(param) and re.search(r"float|array", kind)
                    and not _has_unit(text)):
                gaps.append(f"{where}:{func.lineno} {name}({param}): no [unit]")
    return gaps


def test_dimensional_parameters_of_analyses_io_runs_carry_units():
    gaps = []
    for folder in ("analyses", "io", "runs"):
        for path in sorted((PACKAGE / folder).rglob("*.py")):
            gaps += dimensional_gaps(path.read_text(encoding="utf-8"), _relative(path))
    assert not gaps, f"{len(gaps)} dimensional parameters without a unit:\n" + "\n".join(gaps)


def test_dimensional_checker_can_fail():
    source = ('def f(coolant_temperature, name):\n    """F.\n\n    Parameters\n    ----------\n'
              '    coolant_temperature : float\n        Coolant.\n    name : str\n        Name.\n'
              '    """\n')
    assert dimensional_gaps(source, "f.py") == ["f.py:1 f(coolant_temperature): no [unit]"]
    assert dimensional_gaps(source.replace("Coolant.", "Coolant. [K]"), "f.py") == []


MODEL_MODULES = sorted(
    f"screen.models.{info.name}" for info in pkgutil.iter_modules(screen.models.__path__)
)


@pytest.mark.parametrize("module_name", MODEL_MODULES)
def test_models_doctests(module_name):
    module = importlib.import_module(module_name)
    finder = doctest.DocTestFinder(exclude_empty=True)
    runner = doctest.DocTestRunner(optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    for test in finder.find(module, module_name):
        runner.run(test)
    results = runner.summarize(verbose=False)
    assert results.attempted > 0, f"{module_name} has no doctest example"
    assert results.failed == 0, f"{results.failed} doctest example(s) of {module_name} failed"


# --- the public API rejects unknown keywords -------------------------------------------------

PUBLIC_API = [name for name in screen.__all__ if callable(getattr(screen, name))]


@pytest.mark.parametrize("name", PUBLIC_API)
def test_public_api_rejects_unknown_keywords(name):
    """No public entry point swallows a misspelt keyword (a ``**kwargs`` must be checked)."""
    func = getattr(screen, name)
    signature = inspect.signature(func)
    args = [object()] * sum(
        1 for p in signature.parameters.values()
        if p.kind in (p.POSITIONAL_ONLY, p.POSITIONAL_OR_KEYWORD) and p.default is p.empty
    )
    with pytest.raises(TypeError, match="unexpected keyword|unknown keyword|not_an_option"):
        func(*args, not_an_option=1)

