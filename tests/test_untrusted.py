"""Workbooks from other people: zip limits, XML bombs, external links, no network, damaged files.

Each refusal is checked for its exact reason, a one-line message without a traceback (exit 2),
the audited file left as it was, and no temporary file left behind.  How fast the refusals are is
measured in tests/bench/bench_audit.py, not asserted here.
"""

from __future__ import annotations

import os
import socket
import struct
import tempfile
import zipfile

import pytest
import xlsxwriter

from stillair.addin.workbook import safezip
from stillair.addin.audit.check import audit_book, main
from stillair.addin.workbook.model import evaluate_book
from stillair.addin.workbook.safezip import Limits, UnsafeWorkbook, check_archive, open_package

# The classic entity-expansion document ("billion laughs"): ten levels of ten references.
LAUGHS = (b'<?xml version="1.0"?>\n<!DOCTYPE lolz [<!ENTITY lol "lol">'
          + b"".join(b'<!ENTITY lol%d "%s">' % (i, (b"&lol%d;" % (i - 1) if i > 1 else b"&lol;") * 10)
                     for i in range(1, 10))
          + b']>\n<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">'
            b"<sheetData><row><c><v>&lol9;</v></c></row></sheetData></worksheet>")


def _book(path):
    wb = xlsxwriter.Workbook(str(path))
    sheet = wb.add_worksheet("Calc")
    sheet.write("A1", 1e8)
    sheet.write_formula("B1", "=NU_VPLATE(A1,0.71)", None, 1.0)
    wb.close()
    return path


def _replace_member(path, member, data):
    with zipfile.ZipFile(path) as source:
        items = [(info, source.read(info)) for info in source.infolist()]
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as target:
        for info, old in items:
            target.writestr(info.filename, data if info.filename == member else old)


@pytest.fixture
def scratch(tmp_path, monkeypatch):
    """A private temporary directory for everything the audit might create."""
    temp = tmp_path / "tmp"
    temp.mkdir()
    monkeypatch.setattr(tempfile, "tempdir", str(temp))
    return temp


def _refused(path, scratch, capsys, reason):
    before = (path.read_bytes(), os.stat(path).st_mtime_ns)
    assert main([str(path)]) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    assert captured.err.count("\n") == 1 and "Traceback" not in captured.err
    assert reason in captured.err
    assert (path.read_bytes(), os.stat(path).st_mtime_ns) == before
    assert list(scratch.iterdir()) == []
    assert sorted(p.name for p in path.parent.iterdir()) == sorted(["tmp", path.name])
    return captured.err


def test_openpyxl_parses_through_defusedxml():
    assert safezip.openpyxl_uses_defusedxml()
    from openpyxl.xml import functions
    assert functions.fromstring.__module__.startswith("defusedxml")
    assert functions.iterparse.__module__.startswith("defusedxml")


@pytest.mark.parametrize("member", ["xl/worksheets/sheet1.xml", "xl/workbook.xml"])
def test_billion_laughs_is_refused(tmp_path, scratch, capsys, member):
    path = _book(tmp_path / "laughs.xlsx")
    _replace_member(path, member, LAUGHS)
    err = _refused(path, scratch, capsys, f"refused: {member} declares a DTD or entities")
    assert err.startswith("stillair audit: ")


def test_declared_huge_member_is_refused_before_decompressing(tmp_path, scratch, capsys):
    """The central directory claims 3.75 GiB for the sheet; nothing is decompressed."""
    path = _book(tmp_path / "huge.xlsx")
    data = bytearray(path.read_bytes())
    name = b"xl/worksheets/sheet1.xml"
    at = data.index(b"PK\x01\x02")
    while True:  # the central-directory entry of the sheet
        length = struct.unpack_from("<H", data, at + 28)[0]
        if data[at + 46:at + 46 + length] == name:
            break
        at = data.index(b"PK\x01\x02", at + 4)
    struct.pack_into("<I", data, at + 24, 0xF0000000)   # uncompressed size
    path.write_bytes(bytes(data))
    _refused(path, scratch, capsys, "refused: zip member xl/worksheets/sheet1.xml would expand "
                                    "to 3840 MiB, more than the limit of 100 MiB")


def test_zip_bomb_ratio_is_refused(tmp_path, scratch, capsys):
    path = _book(tmp_path / "bomb.xlsx")
    with zipfile.ZipFile(path, "a", zipfile.ZIP_DEFLATED) as archive:
        with archive.open("xl/media/padding.bin", "w", force_zip64=True) as member:
            block = bytes(1 << 20)
            for _ in range(48):                        # 48 MiB of zeros, about 48 KiB stored
                member.write(block)
    err = _refused(path, scratch, capsys, "refused: zip member xl/media/padding.bin has a "
                                          "compression ratio of")
    assert "typical of a zip bomb" in err


def test_member_count_and_total_limits(tmp_path):
    path = _book(tmp_path / "many.xlsx")
    with zipfile.ZipFile(path) as archive:
        members = len(archive.infolist())
        total = sum(i.file_size for i in archive.infolist())
        with pytest.raises(UnsafeWorkbook, match=f"refused: {members} zip members, more than the "
                                                 f"limit of {members - 1}"):
            check_archive(archive, "many.xlsx", Limits(max_members=members - 1))
        with pytest.raises(UnsafeWorkbook, match="would expand to more than 100 bytes in total"):
            check_archive(archive, "many.xlsx", Limits(max_total_bytes=100))
        check_archive(archive, "many.xlsx", Limits(max_members=members, max_total_bytes=total))


@pytest.mark.parametrize("content, reason", [
    (b"plain text, not a workbook", "not an .xlsx/.xlsm workbook (File is not a zip file)"),
    (b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + bytes(504), "encrypted (password-protected) or legacy .xls"),
])
def test_not_a_workbook(tmp_path, scratch, capsys, content, reason):
    path = tmp_path / "odd.xlsx"
    path.write_bytes(content)
    _refused(path, scratch, capsys, reason)


def test_truncated_and_damaged_files(tmp_path, scratch, capsys):
    path = _book(tmp_path / "cut.xlsx")
    path.write_bytes(path.read_bytes()[:-200])          # the central directory is gone
    _refused(path, scratch, capsys, "not an .xlsx/.xlsm workbook")
    path.unlink()
    path = _book(tmp_path / "broken.xlsx")
    _replace_member(path, "xl/workbook.xml", b"<workbook><sheets></workbook>")
    _refused(path, scratch, capsys, "damaged workbook")
    path.unlink()
    path = _book(tmp_path / "empty.xlsx")
    with zipfile.ZipFile(path, "w") as archive:
        archive.writestr("hello.txt", "no workbook here")
    _refused(path, scratch, capsys, "no xl/workbook.xml")


def test_missing_file(tmp_path, capsys):
    assert main([str(tmp_path / "nowhere.xlsx")]) == 2
    assert capsys.readouterr().err == f"stillair audit: {tmp_path / 'nowhere.xlsx'}: no such file\n"


def _external_link_book(tmp_path):
    """A workbook whose formula reads [1]Sheet1!A1, an external link to other.xlsx (which holds
    1e8 there) - the shape Excel saves; the link's own cached copy says 1e8 too."""
    other = tmp_path / "other.xlsx"
    wb = xlsxwriter.Workbook(str(other))
    wb.add_worksheet("Sheet1").write("A1", 1e8)
    wb.close()
    path = _book(tmp_path / "linked.xlsx")
    _replace_member(path, "xl/worksheets/sheet1.xml", zipfile.ZipFile(path).read(
        "xl/worksheets/sheet1.xml").replace(b"NU_VPLATE(A1,0.71)", b"NU_VPLATE([1]Sheet1!$A$1,0.71)"))
    with zipfile.ZipFile(path) as source:
        items = {i.filename: source.read(i) for i in source.infolist()}
    ns = b'xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" ' \
         b'xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships"'
    items["xl/externalLinks/externalLink1.xml"] = (
        b'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<externalLink ' + ns +
        b'><externalBook r:id="rId1"><sheetNames><sheetName val="Sheet1"/></sheetNames>'
        b'<sheetDataSet><sheetData sheetId="0"><row r="1"><cell r="A1"><v>100000000</v></cell>'
        b"</row></sheetData></sheetDataSet></externalBook></externalLink>")
    items["xl/externalLinks/_rels/externalLink1.xml.rels"] = (
        b'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n<Relationships xmlns="http://'
        b'schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="'
        b'http://schemas.openxmlformats.org/officeDocument/2006/relationships/externalLinkPath" '
        b'Target="other.xlsx" TargetMode="External"/></Relationships>')
    items["xl/workbook.xml"] = items["xl/workbook.xml"].replace(
        b"</sheets>", b'</sheets><externalReferences><externalReference r:id="rId99"/>'
        b"</externalReferences>")
    items["xl/_rels/workbook.xml.rels"] = items["xl/_rels/workbook.xml.rels"].replace(
        b"</Relationships>", b'<Relationship Id="rId99" Type="http://schemas.openxmlformats.org/'
        b'officeDocument/2006/relationships/externalLink" Target="externalLinks/externalLink1.xml"'
        b"/></Relationships>")
    items["[Content_Types].xml"] = items["[Content_Types].xml"].replace(
        b"</Types>", b'<Override PartName="/xl/externalLinks/externalLink1.xml" ContentType="'
        b'application/vnd.openxmlformats-officedocument.spreadsheetml.externalLink+xml"/></Types>')
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as target:
        for name, data in items.items():
            target.writestr(name, data)
    return path


def test_external_links_are_not_followed(tmp_path):
    path = _external_link_book(tmp_path)
    # Unguarded, `formulas` opens other.xlsx and computes from it: the hazard is real.
    from formulas.excel import xlreader
    assert xlreader.load_workbook.__qualname__ == "load_workbook"  # no guard left installed
    with zipfile.ZipFile(path) as archive:
        assert any("externalLink" in name for name in archive.namelist())
    # stillair calc never opens a linked file: the cell cannot be evaluated, and says why.
    evaluation = evaluate_book(str(path))
    assert evaluation.values["Calc"]["B1"] is None
    assert evaluation.results[("Calc", "B1")].status == "cannot-evaluate"
    result = audit_book(str(path))
    assert [(f.kind, f.cell) for f in result.findings] == [("cannot-evaluate", "Calc!B1")]
    assert result.findings[0].message == ("cannot evaluate: reference [1]Sheet1!$A$1 points into "
                                          "another workbook, which is not opened")


def test_no_network_connection(tmp_path, monkeypatch):
    """A socket that cannot be created does not stop an audit: none is ever needed."""

    def no_socket(*args, **kwargs):
        raise AssertionError("the audit tried to open a socket")

    monkeypatch.setattr(socket, "socket", no_socket)
    monkeypatch.setattr(socket, "create_connection", no_socket)
    result = audit_book(str(_book(tmp_path / "net.xlsx")))
    assert [(f.kind, f.cell) for f in result.findings] == [("mismatch", "Calc!B1")]


def test_offline_guard_refuses_connections():
    with safezip.offline():
        with pytest.raises(UnsafeWorkbook, match="tried to open a network connection"):
            socket.create_connection(("192.0.2.1", 80))   # TEST-NET-1, RFC 5737
        with pytest.raises(UnsafeWorkbook):
            socket.getaddrinfo("example.com", 80)
    assert socket.getaddrinfo.__module__ == "socket"
    assert "connect" not in vars(socket.socket)         # inherited from _socket.socket again


def test_open_package_accepts_a_plain_workbook(tmp_path):
    with open_package(str(_book(tmp_path / "fine.xlsx"))) as archive:
        assert "xl/workbook.xml" in archive.namelist()
