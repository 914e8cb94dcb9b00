""".ods in: calc and audit convert it through LibreOffice into a temporary .xlsx, say so, and
never touch the input; without LibreOffice, one line says what to install."""

from __future__ import annotations

import shutil
import subprocess

import pytest

from stillair.addin.cli import main
from stillair.addin.libreoffice import build
from stillair.addin.libreoffice.setup import libreoffice_environment
from stillair.addin.templates.spec import TEMPLATE_DIR
from stillair.addin.workbook.model import evaluate_book

CABINET = TEMPLATE_DIR / "sealed-cabinet.xlsx"


def test_without_libreoffice_an_ods_gets_one_line_saying_what_to_install(tmp_path, capsys,
                                                                          monkeypatch):
    def missing():
        raise build.ToolMissing("LibreOffice is not installed")
    monkeypatch.setattr("stillair.addin.libreoffice.convert.find_program_dir", missing)
    ods = tmp_path / "mine.ods"
    ods.write_bytes(b"PK not really")
    for command in ("calc", "audit"):
        assert main([command, str(ods)]) == 2
        err = capsys.readouterr().err
        assert err.count("\n") == 1 and "mine.ods" in err
        assert "apt-get install libreoffice-calc" in err and "save the workbook as .xlsx" in err


@pytest.mark.slow  # LibreOffice converts the file
def test_an_ods_is_converted_and_calculated_like_the_xlsx(tmp_path, capsys):
    try:
        program = build.find_program_dir()
    except build.ToolMissing as error:
        pytest.skip(f"needs LibreOffice: {error}")
    source = tmp_path / "cabinet.xlsx"
    shutil.copyfile(CABINET, source)
    subprocess.run([str(program / "soffice"), f"-env:UserInstallation={(tmp_path / 'p').as_uri()}",
                    "--headless", "--convert-to", "ods", "--outdir", str(tmp_path), str(source)],
                   check=True, capture_output=True, timeout=600, env=libreoffice_environment())
    ods = tmp_path / "cabinet.ods"
    before = ods.read_bytes()
    listing = sorted(p.name for p in tmp_path.iterdir())
    assert main(["calc", str(ods), "--json"]) == 0
    out, err = capsys.readouterr()
    assert "converted by LibreOffice into a temporary .xlsx" in err
    import json
    values = json.loads(out)["values"]
    expected = evaluate_book(str(CABINET)).flat_values()
    assert values["Results!B5"] == pytest.approx(expected["Results!B5"], rel=1e-12)
    assert main(["audit", str(ods)]) in (0, 1)
    assert "cabinet.ods" in capsys.readouterr().out
    assert ods.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == listing   # no lock file, no leftovers
