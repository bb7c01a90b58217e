"""What the ``snakemake --report`` HTML shows beside the figures, composed from the cube: the
landing text (the sweep, its preset and conditions, the reduced mass, the engine's tolerance and
the accuracy it is checked to, the model's scope) and HTML pages the report displays inline (the
run summary, the stored configuration, the critical-length table).  Snakemake shows a result of
type text/html in its viewer, while a text or CSV file is only offered as a download.
"""

from __future__ import annotations

import csv
import html
from pathlib import Path

import numpy as np

from ..engine.bound.levels import RTOL
from ..cube.model import family_title
from ..plots.table_notes import mass_text

__all__ = ["landing_text", "text_page", "table_page", "write_report_pages", "MAX_TABLE_ROWS", "SCOPE"]

SCOPE = ("the non-relativistic Schrödinger equation with a static screened potential (no dynamic screening, "
         "no ion correlations); the screening models are linear, mean-field ones: Debye–Hückel holds at weak "
         "coupling only. The results are not a substitute for a licensed or site-specific safety assessment")

MAX_TABLE_ROWS = 5000  # rows shown inline; the CSV beside it holds them all
_STYLE = ("body{font-family:sans-serif;font-size:14px;margin:1em;color:#222}"
          "pre{background:#f6f6f6;padding:.8em;border:1px solid #ddd;white-space:pre-wrap}"
          "table{border-collapse:collapse;font-size:12px}th,td{border:1px solid #ccc;padding:2px 6px;"
          "text-align:right}th{background:#eee;position:sticky;top:0}td.t{text-align:left}"
          ".notes{font-size:13px;line-height:1.4}")


def _page(title: str, body: str) -> str:
    return (f"<!DOCTYPE html>\n<html><head><meta charset=\"utf-8\"><title>{html.escape(title)}</title>"
            f"<style>{_STYLE}</style></head>\n<body><h3>{html.escape(title)}</h3>\n{body}\n</body></html>\n")


def text_page(title: str, text: str, intro: str = "") -> str:
    """A text (the run summary, the configuration) as an HTML page, verbatim."""
    lead = f"<p class=\"notes\">{html.escape(intro)}</p>\n" if intro else ""
    return _page(title, f"{lead}<pre>{html.escape(text)}</pre>")


def table_page(title: str, csv_path) -> str:
    """A ``#``-commented CSV as an HTML page: its comments as notes, then its rows as a table."""
    lines = Path(csv_path).read_text(encoding="utf-8").splitlines()
    notes = [line[1:].strip() for line in lines if line.startswith("#")]
    rows = list(csv.reader(line for line in lines if not line.startswith("#")))
    header, body = (rows[0], rows[1:]) if rows else ([], [])
    shown = body[:MAX_TABLE_ROWS]
    cells = "\n".join("<tr>" + "".join(f"<td{' class=t' if not _numeric(v) else ''}>{html.escape(v)}</td>"
                                       for v in row) + "</tr>" for row in shown)
    more = (f"<p class=\"notes\">{len(body) - len(shown)} more rows in {html.escape(Path(csv_path).name)}</p>"
            if len(body) > len(shown) else "")
    notes_html = "<br>\n".join(html.escape(note) for note in notes)
    return _page(title, f"<p class=\"notes\">{notes_html}</p>\n<table><tr>"
                        + "".join(f"<th>{html.escape(h)}</th>" for h in header) + f"</tr>\n{cells}</table>{more}")


def _numeric(value: str) -> bool:
    try:
        float(value)
    except ValueError:
        return False
    return True


def _axis(ds, dim) -> str:
    values = ds[dim].values
    attrs = ds[dim].attrs
    unit = attrs.get("units", "1")
    unit = "" if unit == "1" or " " in unit else f" {unit}"  # a scaled unit (bohr) is said once, below
    name = attrs.get("long_name", dim)
    if values.size <= 6:
        shown = ", ".join(f"{v:g}" for v in values)
    else:
        shown = f"{values.min():g} … {values.max():g} ({values.size} values)"
    return f"{name} {shown}{unit}"


def _validity(ds) -> str:
    if "screening_validity" not in ds:
        return ""
    flag = ds["screening_validity"].values
    meanings = ds["screening_validity"].attrs["flag_meanings"].split()
    bad = {meanings[v]: int(n) for v, n in zip(*np.unique(flag, return_counts=True)) if v != 0}
    where = "; ".join(f"{name.replace('_', ' ')}: {n}" for name, n in bad.items()) or "none"
    return (f" The screening model fails in {sum(bad.values())} of {flag.size} conditions of this sweep ({where}): "
            "those cells are hatched in every figure, and their numbers are the model's, not the plasma's.")


def landing_text(ds, config: dict, summary: str) -> str:
    """The report's first page (reStructuredText) for the cube ``ds`` (loaded attributes and
    coordinates suffice), its stored ``config`` and the run's ``summary`` text."""
    attrs = ds.attrs
    family = family_title(attrs.get("family", ""))
    dims = [d for d in ds["status"].dims]
    axes = "; ".join(_axis(ds, d) for d in dims)
    cells = int(np.prod([ds.sizes[d] for d in dims]))
    preset = config.get("preset") or {}
    lines = [f"boundscape sweep **{attrs.get('sweep', '?')}**: every bound state of the **{family}** potential "
             f"over {axes} — {cells} cells, merged into one CF-1.10 NetCDF cube, "
             f"``results/{attrs.get('sweep', '?')}/levels.nc`` (boundscape {attrs.get('boundscape_version', '?')}).", ""]
    if preset:
        settings = ", ".join(f"{k} {v}" for k, v in preset.items() if k not in ("kind", "map"))
        text = f"- **Preset**: {preset.get('kind')} ({settings})."
        if "screening_model" in attrs:
            text += (f" Screening model ``{attrs['screening_model']}``: ``{attrs.get('screening_model_description', '')}``;"
                     f" screened by {attrs.get('screening_species', '?')}.")
        lines.append(text)
    else:
        lines.append("- **Preset**: none; every number in atomic units (hartree, bohr).")
    lines.append(f"- **Reduced mass**: {mass_text(attrs)} "
                 "(the engine's mass; the cube's attributes ``mass`` and ``mass_units``).")
    tol = f"{RTOL:.0e}".replace("e-0", "e-")
    accuracy = (f"- **Accuracy**: every level is converged until its error estimate (Richardson, grids h, h/2, h/4; "
                f"stored as ``energy_error``) is below {tol} of its energy, and flagged where it is not. The "
                f"engine is checked to {tol} against exact levels (Coulomb, Hulthén, oscillator, square well) "
                "and an independent DOP853 shooting solver on cells no formula covers (the test suite). Critical "
                "screening lengths are roots of the zero-energy problem (brentq), with an error estimate each")
    if "critical_screening_length_error" in ds:
        rel = (ds["critical_screening_length_error"] / ds["critical_screening_length"]).values
        rel = rel[np.isfinite(rel)]
        if rel.size:
            accuracy += f" (here at most {rel.max():.1e} relative)"
    lines.append(accuracy + ".")
    lines.append(f"- **Scope**: {SCOPE[0].upper()}{SCOPE[1:]}.{_validity(ds)}")
    head = summary.strip().splitlines()[:2]
    lines.append(f"- **Run**: {' — '.join(head)}.")
    lines += ["", "Every figure and table is drawn from the cube alone. The configuration (as stored in the "
              "cube, with the defaults that decided its numbers), the run summary (every flag of every variable, "
              "counted) and the critical-length table are shown in the report itself, under *Run* and *Tables*; "
              "Snakemake's runtime statistics are under *Statistics*."]
    return "\n".join(lines) + "\n"


def write_report_pages(cube, summary, table, config_yaml, outdir) -> list[Path]:
    """Write the landing text and the inline pages under ``outdir``; returns their paths."""
    import yaml

    from ..cube import open_cube

    outdir = Path(outdir)
    outdir.mkdir(parents=True, exist_ok=True)
    summary_text = Path(summary).read_text(encoding="utf-8")
    config_text = Path(config_yaml).read_text(encoding="utf-8")
    with open_cube(cube) as ds:
        keep = [v for v in ("status", "screening_validity", "critical_screening_length",
                            "critical_screening_length_error") if v in ds]
        small = ds[keep].load()
        small.attrs = dict(ds.attrs)
    config = yaml.safe_load(small.attrs.get("config_yaml") or "{}") or {}
    pages = {
        "landing.rst": landing_text(small, config, summary_text),
        "run_summary.html": text_page("Run summary", summary_text),
        "configuration.html": text_page(
            "Configuration", config_text,
            "What the user wrote, plus the defaults that decided the numbers, under the names the schema "
            "documents; stored in the cube as config_yaml (its sha256 on the first line)."),
        "critical_screening_lengths.html": table_page("Critical screening lengths", table),
    }
    written = []
    for name, text in pages.items():
        (outdir / name).write_text(text, encoding="utf-8")
        written.append(outdir / name)
    return written
