"""The README's shown outputs are what the commands print (every example reproducible)."""

from __future__ import annotations

import os
import re
from pathlib import Path

from stillair.addin.cli import main

ROOT = Path(__file__).resolve().parents[1]
README = (ROOT / "README.md").read_text(encoding="utf-8")
STALE = "README.md shows an outdated output of `{}`: paste the command's current output"


def _shown_after(marker: str) -> list[str]:
    """The indented block that follows ``marker`` in the README, dedented."""
    tail = README[README.index(marker) + len(marker):]
    block = re.match(r"\n*((?:(?: {4}.*)?\n)+)", tail).group(1)
    return [line[4:] for line in block.rstrip("\n").split("\n")]


def _run(capsys, *argv) -> tuple[int, list[str]]:
    code = main([str(a) for a in argv])
    return code, capsys.readouterr().out.rstrip("\n").split("\n")


def test_main_job_output(capsys, monkeypatch):
    monkeypatch.chdir(ROOT)
    shown = _shown_after("The first command prints (the three timings vary with the machine):")
    code, printed = _run(capsys, "calc", "templates/sealed-cabinet.xlsx")
    assert code == 0
    timings = re.compile(r"\d+\.\d\d s")
    assert timings.sub("", printed[0]) == timings.sub("", shown[0])
    assert printed[1:] == shown[1:], STALE.format("stillair calc templates/sealed-cabinet.xlsx")


def test_audit_examples(capsys, monkeypatch, tmp_path):
    monkeypatch.chdir(ROOT)
    clean = _shown_after("A shipped template is clean:")
    code, printed = _run(capsys, "audit", "templates/sealed-cabinet.xlsx")
    assert code == 0 and printed == clean[1:], STALE.format(clean[0])

    shown = _shown_after("saved value (the defined name `h_conv`) was typed over with 2.5 — as happens when "
                         "someone pastes\na number over a formula's result — and audit it:")
    build, audit = shown[0].lstrip("$ ").split(), shown[1].lstrip("$ ").split()
    monkeypatch.chdir(tmp_path)
    os.symlink(ROOT / "templates", tmp_path / "templates")
    assert _run(capsys, *build[1:])[0] == 0
    code, printed = _run(capsys, *audit[1:])
    assert code == 1 and printed == shown[2:], STALE.format(shown[1])


def test_python_examples_run():
    blocks = re.findall(r"```python\n(.*?)```", README, flags=re.S)
    assert blocks
    namespace: dict = {}
    for block in blocks:  # in order: later blocks use the names of earlier ones
        exec(compile(block, "README.md", "exec"), namespace)
    assert namespace["result"].branches["conv"].method == "churchill-chu"


def _anchor(heading: str) -> str:
    """GitHub's anchor for a heading: lower case, punctuation but hyphens and underscores dropped,
    spaces as hyphens."""
    text = re.sub(r"[^\w\- ]", "", heading.strip().lower())
    return text.replace(" ", "-")


def test_the_contents_list_reaches_every_section_in_one_jump():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    contents = readme.split("**Contents**", 1)[1].split("\n\n", 1)[0]
    linked = re.findall(r"\]\(#([^)]+)\)", contents)
    headings = {_anchor(h) for h in re.findall(r"^#{2,3} (.+)$", readme, re.M)}
    sections = [_anchor(h) for h in re.findall(r"^## (.+)$", readme, re.M)]
    assert set(linked) <= headings, sorted(set(linked) - headings)      # no dead link
    assert set(sections) <= set(linked), sorted(set(sections) - set(linked))  # every section
    # the contents list comes right after the opening paragraph, before the set-up
    assert readme.index("**Contents**") < readme.index("## Getting the code") < readme.index("## Set-up")
