"""How the ``snakemake --report`` HTML is laid out for a reader: categories in the order one reads
a sweep (maps, fans, lines, conditions, scattering, populations, tables, run), readable labels instead of file names, and
the l = 0 threshold map's own caption.  The workflow's rules call these at parse time.

Snakemake's report sorts categories by name (``localeCompare``), so each carries its place as a
number: ``"1. Maps"``.
"""

from __future__ import annotations

__all__ = ["ORDER", "arrange", "figure_label"]

ORDER = ("Maps", "Fans", "Lines", "Conditions", "Scattering", "Populations", "Tables", "Run")
# the workflow's own figure groups, as a reader names them
_GROUP = {"Threshold maps": "Maps", "Level fans": "Fans", "Resonance fans": "Fans", "Spectral lines": "Lines",
          "Physical conditions": "Conditions"}
_SUBCATEGORY = {"level_fan": "bound levels", "resonance_fan": "past the threshold"}
_NAMES = {"level_fan": "Level fan", "resonance_fan": "Resonance fan", "condition_map": "Condition map",
          "line_survival": "Line survival chart", "inverse_scattering_length": "Inverse scattering length 1/a",
          "phase_shifts": "Phase shifts", "partition_function": "Partition function",
          "continuum_lowering": "Continuum lowering", "donor_freeze_out": "Donor freeze-out",
          "exciton_balance": "Exciton balance"}


def figure_label(stem: str) -> str:
    """A figure's name as a reader reads it: ``threshold_map_l0`` → ``"Threshold map, l = 0"``."""
    if stem.startswith("threshold_map_l"):
        return f"Threshold map, l = {stem.removeprefix('threshold_map_l')}"
    if stem.startswith("ionization_map_Z"):
        return f"Ionization map, Z = {stem.removeprefix('ionization_map_Z')}"
    if stem.startswith("line_shift_"):
        return f"Line shift, {stem.removeprefix('line_shift_').replace('-', '–')}"
    return _NAMES.get(stem, stem.replace("_", " ").capitalize())


def arrange(figures):
    """The workflow's ``(stem, caption, category, subcategory)`` figure list with numbered
    categories in the reader's order, and ``{group: numbered category}`` for every group present
    (``"Tables"`` and ``"Run"`` always are).  The l = 0 threshold map takes its own caption (no
    resonance bands: l = 0 has none)."""
    present = {_GROUP.get(category, category) for _, _, category, _ in figures} | {"Tables", "Run"}
    ordered = [group for group in ORDER if group in present] + sorted(present - set(ORDER))
    numbered = {group: f"{i}. {group}" for i, group in enumerate(ordered, 1)}
    out = []
    for stem, caption, category, subcategory in figures:
        if stem == "threshold_map_l0":
            caption = "threshold_map_l0.rst"
        out.append((stem, caption, numbered[_GROUP.get(category, category)],
                    _SUBCATEGORY.get(stem, subcategory)))
    return out, numbered
