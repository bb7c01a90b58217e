"""Reading a sweep's YAML: a key given twice is refused naming it and its lines, numbers written
like 1e308 are numbers, and a file that is not UTF-8 is one line naming it: through the package
(load_config, the plan step) and through the Snakefile, whose own config reading is redone by
the package."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from boundscape import sweep
from boundscape.cli import steps
from boundscape.errors import InputError
from boundscape.sweep.config import load_yaml, read_config_files

REPO = Path(__file__).resolve().parents[1]
GOOD = """\
sweep: tiny
potential:
  family: yukawa
grid:
  strength: [1.0, 2.0]
  screening_length: {start: 0.5, stop: 50.0, num: 5, spacing: log}
  l: [0, 1]
  n_r_max: 3
tiles: {cells: 4}
"""


def write(path, text, encoding="utf-8"):
    path.write_bytes(text.encode(encoding))
    return path


@pytest.mark.parametrize("text, key, lines", [
    (GOOD + "sweep: other\n", "sweep", (1, 10)),
    (GOOD.replace("  n_r_max: 3\n", "  n_r_max: 3\n  l: [2]\n"), "l", (7, 9)),   # nested, under grid
])
def test_a_key_given_twice_is_refused_naming_it_and_its_lines(tmp_path, text, key, lines):
    path = write(tmp_path / "sweep.yaml", text)
    with pytest.raises(InputError) as info:
        sweep.load_config(path)
    message = str(info.value)
    assert "\n" not in message and str(path) in message
    assert f"key {key!r} given twice" in message
    assert f"line {lines[1]}" in message and f"first on line {lines[0]}" in message


def test_a_merge_key_override_is_not_a_duplicate(tmp_path):
    # YAML merge keys (https://yaml.org/type/merge.html): keys beside "<<" override the merged ones.
    path = write(tmp_path / "merge.yaml", "base: &b {a: 1, b: 2}\nother:\n  <<: *b\n  a: 3\n")
    assert load_yaml(path) == {"base": {"a": 1, "b": 2}, "other": {"a": 3, "b": 2}}


@pytest.mark.parametrize("written, value", [
    ("1e308", 1e308), ("1E-5", 1e-5), ("-2e3", -2000.0), ("+5e-1", 0.5), ("1.0e+3", 1000.0),
    (".5", 0.5), ("7", 7), ("'1e3'", "1e3"), ("0.1", 0.1),
])
def test_numbers_are_read_as_yaml_1_2_reads_them(tmp_path, written, value):
    # YAML 1.2.2 core schema, section 10.2.2 (tag resolution): [-+]?(\.[0-9]+|[0-9]+(\.[0-9]*)?)([eE][-+]?[0-9]+)?
    # is a float; a quoted scalar stays a string.
    loaded = load_yaml(write(tmp_path / "n.yaml", f"x: {written}\n"))["x"]
    assert loaded == value and type(loaded) is type(value)


def test_1e308_reaches_the_plan_as_a_number(tmp_path):
    path = write(tmp_path / "sweep.yaml", GOOD.replace("[1.0, 2.0]", "[1e0, 2e0]"))
    plan = sweep.plan(sweep.load_config(path))
    assert plan.strength.tolist() == [1.0, 2.0]


@pytest.mark.parametrize("encoding, words", [
    ("latin-1", "line 1: not UTF-8 text (byte 0xe9, perhaps Latin-1); save it as UTF-8"),
    ("utf-16", "UTF-16 or UTF-32 text; save it as UTF-8"),
    ("utf-16-le", "UTF-16 or UTF-32 text; save it as UTF-8"),   # no byte-order mark
])
def test_a_file_not_in_utf8_is_one_line(tmp_path, encoding, words, capsys):
    path = write(tmp_path / "sweep.yaml", "# Température du plasma\n" + GOOD, encoding)
    with pytest.raises(InputError) as info:
        sweep.load_config(path)
    message = str(info.value)
    assert message.startswith(f"configuration file {path}") and message.endswith(words) and "\n" not in message
    # The plan step: the same line on stderr, exit status 2, no traceback.
    assert steps.main(["plan", "--config", str(path)]) == 2
    err = capsys.readouterr().err
    assert err.strip().endswith("save it as UTF-8") and "Traceback" not in err and len(err.splitlines()) == 1


def test_config_files_merge_as_snakemake_merges_them(tmp_path):
    # Snakemake's update_config: later files update mappings key by key; --config overrides last.
    first = write(tmp_path / "a.yaml", "sweep: a\ngrid: {l: [0], n_r_max: 3}\n")
    second = write(tmp_path / "b.yaml", "grid: {n_r_max: 4}\nmass: 1e0\n")
    merged = read_config_files([str(first)], [second], {"sweep": "c"})
    assert merged == {"sweep": "c", "grid": {"l": [0], "n_r_max": 4}, "mass": 1.0}


def dry_run(workdir, *args):
    command = [sys.executable, "-m", "snakemake", "-n", "--snakefile", str(REPO / "workflow" / "Snakefile"),
               "--directory", str(workdir), "--cores", "1", *args]
    return subprocess.run(command, capture_output=True, text=True, timeout=300)


@pytest.mark.workflow
def test_snakemake_refuses_a_duplicate_key_and_reads_1e0_as_a_number(tmp_path):
    dup = write(tmp_path / "dup.yaml", GOOD + "sweep: other\n")
    run = dry_run(tmp_path, "--configfile", str(dup))
    lines = [line for line in run.stderr.splitlines() if line.startswith("boundscape:")]
    assert run.returncode != 0 and lines, run.stderr[-2000:]
    assert "key 'sweep' given twice" in lines[0] and "Traceback" not in run.stderr
    # Snakemake's own YAML reading leaves 5e-1 a string; the workflow reads it as 0.5.
    numbers = write(tmp_path / "numbers.yaml", GOOD.replace("start: 0.5, stop: 50.0", "start: 5e-1, stop: 5e1"))
    run = dry_run(tmp_path, "--configfile", str(numbers))
    assert run.returncode == 0, run.stdout[-2000:] + run.stderr[-2000:]
    assert "solve_tile" in run.stdout


@pytest.mark.workflow
def test_snakefile_default_config_not_in_utf8_is_one_line(tmp_path):
    # Without --configfile the Snakefile reads config/config.yaml itself: checked before Snakemake does.
    (tmp_path / "config").mkdir()
    write(tmp_path / "config" / "config.yaml", "# Température\n" + GOOD, "latin-1")
    run = dry_run(tmp_path)
    assert run.returncode != 0
    assert "Traceback" not in run.stderr and "UnicodeDecodeError" not in run.stderr, run.stderr[-2000:]
    lines = [line for line in run.stderr.splitlines() if line.startswith("boundscape:")]
    assert lines and lines[0].endswith("save it as UTF-8") and "config/config.yaml" in lines[0]

