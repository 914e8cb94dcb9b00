"""Printing templates through LibreOffice: PDF as a checker's printer would make it, and the
README's pictures."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path
from typing import Sequence

__all__ = ["render_pdf", "render_pictures"]


def render_pdf(paths: Sequence[str | os.PathLike], out_dir: str | os.PathLike, timeout: float = 300) -> list[Path]:
    """Print workbooks to PDF with LibreOffice headless, as a checker's printer would.

    Uses a throw-away user profile, so nothing of the user's LibreOffice changes.  Raises
    FileNotFoundError when ``soffice`` is not installed."""
    import shutil
    import subprocess

    soffice = shutil.which("soffice") or shutil.which("libreoffice")
    if soffice is None:
        raise FileNotFoundError("LibreOffice (soffice) is not installed")
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    with tempfile.TemporaryDirectory(prefix="stillair-lo-profile-") as profile:
        subprocess.run([soffice, f"-env:UserInstallation={Path(profile).as_uri()}", "--headless", "--norestore",
                        "--convert-to", "pdf", "--outdir", str(out)] + [str(p) for p in paths],
                       check=True, capture_output=True, timeout=timeout)
    return [out / (Path(p).stem + ".pdf") for p in paths]


def render_pictures(out_dir: str | os.PathLike, dpi: int = 80) -> list[Path]:
    """The README's pictures: the first printed page of each template's Results sheet, as PNG.

    Needs LibreOffice and poppler-utils (pdftotext, pdftoppm)."""
    import subprocess

    from . import all_templates

    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)     # pdftoppm writes into it, and does not create it
    templates = all_templates()
    pictures = []
    with tempfile.TemporaryDirectory(prefix="stillair-render-") as directory:
        for template, pdf in zip(templates, render_pdf([t.path for t in templates], directory)):
            page = 1
            while True:
                text = subprocess.run(["pdftotext", "-f", str(page), "-l", str(page), "-layout", str(pdf), "-"],
                                      check=True, capture_output=True, text=True).stdout
                if f"{template.path.name} - Results" in text:
                    break
                page += 1
            target = out / f"{template.name}-results"
            subprocess.run(["pdftoppm", "-png", "-r", str(dpi), "-f", str(page), "-l", str(page), "-singlefile",
                            str(pdf), str(target)], check=True)
            pictures.append(target.with_suffix(".png"))
    return pictures
