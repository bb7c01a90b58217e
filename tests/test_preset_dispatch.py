"""No module outside ``physics/`` tests a preset's type: a preset is one class that answers every
question the cube, the figures, the command line and the workflow ask (``isinstance`` on a preset,
``type(preset)`` looked up or compared, a mapping keyed by preset classes are all caught here)."""

from __future__ import annotations

import ast
import re
from pathlib import Path

import pytest

from boundscape.physics.presets import Preset

ROOT = Path(__file__).resolve().parents[1]
PACKAGE = ROOT / "src" / "boundscape"


def _subclasses(cls):
    for sub in cls.__subclasses__():
        yield sub
        yield from _subclasses(sub)


# Every preset class, the registry's and the bases: a new preset is covered without listing it.
PRESET_CLASSES = {Preset.__name__} | {cls.__name__ for cls in _subclasses(Preset)}


def _names_in(node):
    """The class names an expression mentions (``Plasma``, ``presets.Plasma``, ``(A, B)``, ``A | B``)."""
    for sub in ast.walk(node):
        if isinstance(sub, ast.Name):
            yield sub.id
        elif isinstance(sub, ast.Attribute):
            yield sub.attr


def _mentions_preset_class(node):
    return any(name in PRESET_CLASSES for name in _names_in(node))


def _is_type_of(node):
    """``type(x)``: the class of an object, looked up or compared."""
    return (isinstance(node, ast.Call) and isinstance(node.func, ast.Name) and node.func.id == "type"
            and len(node.args) == 1)


def _is_type_of_preset(node):
    """``type(preset)``, ``type(self.preset)``: the class of something named a preset."""
    return _is_type_of(node) and any("preset" in name.lower() for name in _names_in(node.args[0]))


def type_dispatches(source: str, filename: str = "<probe>") -> list[tuple[int, str]]:
    """(line, what) of every test of a preset's type in Python ``source``."""
    found = []
    for node in ast.walk(ast.parse(source, filename=filename)):
        if (isinstance(node, ast.Call) and isinstance(node.func, ast.Name)
                and node.func.id in ("isinstance", "issubclass") and len(node.args) == 2
                and _mentions_preset_class(node.args[1])):
            found.append((node.lineno, f"{node.func.id} with a preset class"))
        elif isinstance(node, ast.Compare) and any(_is_type_of(n) for n in [node.left, *node.comparators]) \
                and _mentions_preset_class(node):
            found.append((node.lineno, "type(...) compared with a preset class"))
        elif isinstance(node, ast.Dict) and any(key is not None and _mentions_preset_class(key) for key in node.keys):
            found.append((node.lineno, "a mapping keyed by preset classes"))
        elif isinstance(node, ast.Subscript) and _is_type_of_preset(node.slice):
            found.append((node.lineno, "a lookup by type(...)"))
        elif isinstance(node, ast.Attribute) and node.attr == "__name__" and _is_type_of_preset(node.value):
            found.append((node.lineno, "type(...).__name__ read as a kind"))
        elif isinstance(node, ast.MatchClass) and _mentions_preset_class(node.cls):
            found.append((node.lineno, "a match on a preset class"))
    return sorted(found)


# Snakemake files are not plain Python: their rules are searched as text.
_SMK_PATTERN = re.compile(r"\b(isinstance|issubclass)\s*\([^)]*\b(" + "|".join(sorted(PRESET_CLASSES)) + r")\b"
                          r"|\btype\s*\(\s*\w*PRESET\w*\s*\)", re.IGNORECASE)


def smk_dispatches(text: str) -> list[tuple[int, str]]:
    return [(number, line.strip()) for number, line in enumerate(text.splitlines(), 1) if _SMK_PATTERN.search(line)]


OUTSIDE_PHYSICS = sorted(p for p in PACKAGE.rglob("*.py") if "physics" not in p.relative_to(PACKAGE).parts)
WORKFLOW_FILES = sorted([ROOT / "workflow" / "Snakefile", *(ROOT / "workflow" / "rules").glob("*.smk")])


def test_the_files_are_found():
    assert len(OUTSIDE_PHYSICS) > 40 and PACKAGE / "plots" / "style.py" in OUTSIDE_PHYSICS
    assert ROOT / "workflow" / "rules" / "common.smk" in WORKFLOW_FILES
    assert {"Plasma", "Semiconductor", "Nuclear", "NoPreset"} <= PRESET_CLASSES


@pytest.mark.parametrize("path", OUTSIDE_PHYSICS, ids=lambda p: str(p.relative_to(PACKAGE)))
def test_no_preset_type_dispatch_outside_physics(path):
    found = type_dispatches(path.read_text(), str(path))
    assert not found, f"{path.relative_to(ROOT)} tests a preset's type (ask the preset instead): {found}"


@pytest.mark.parametrize("path", WORKFLOW_FILES, ids=lambda p: p.name)
def test_no_preset_type_dispatch_in_the_workflow(path):
    found = smk_dispatches(path.read_text())
    assert not found, f"{path.relative_to(ROOT)} tests a preset's type: {found}"


def test_the_check_catches_each_kind_of_dispatch():
    # Negative control: each of these is a type dispatch the redesign removed, and is caught.
    probe = "\n".join([
        "from ..physics import presets",
        "from ..physics.presets import Nuclear, Plasma, Semiconductor",
        "a = isinstance(preset, Nuclear)",
        "b = isinstance(preset, (Plasma, Semiconductor))",
        "c = isinstance(preset, presets.Plasma | presets.Semiconductor)",
        "d = type(preset) is Nuclear",
        "e = {Plasma: 'eV', Nuclear: 'MeV'}",
        "f = UNITS[type(preset)]",
        "g = type(preset).__name__.lower()",
        "match preset:",
        "    case Semiconductor():",
        "        pass",
    ])
    assert [line for line, _ in type_dispatches(probe)] == [3, 4, 5, 6, 7, 8, 9, 11]
    smk = "HAS_MAP = isinstance(PRESET, (_presets.Plasma, _presets.Semiconductor))\nKIND = type(PRESET)\n"
    assert [line for line, _ in smk_dispatches(smk)] == [1, 2]


def test_asking_the_preset_is_not_a_dispatch():
    # ... and code that asks the preset, or tests other types, passes.
    probe = "\n".join([
        "from ..physics.presets import NO_PRESET, Plasma",
        "plasma = Plasma(temperature_eV=3.0)",
        "unit, factor = preset.shown_energy_unit(mass)",
        "if preset.condition_axes is None: pass",
        "ok = isinstance(value, float) and isinstance(spec, dict)",
        "name = f'{type(exc).__name__}: {exc}'",
    ])
    assert type_dispatches(probe) == []
    assert smk_dispatches("HAS_CONDITION_MAP = PRESET.has_condition_map\n") == []
