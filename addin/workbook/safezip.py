"""Guards for workbooks that come from other people.

An .xlsx/.xlsm file is a zip package of XML parts.  Before anything decompresses or parses a part,
:func:`open_package` checks what the zip's central directory declares:

* the number of members, each member's uncompressed size, the total, and the compression ratio
  of every member larger than :attr:`Limits.ratio_floor` (a deflate bomb reaches about 1000:1;
  real workbooks stay far below :attr:`Limits.max_ratio`);
* no encrypted members (an encrypted workbook is not a zip at all; it is refused by its OLE
  signature with its own message);
* no XML part declares a DTD: every ``.xml``/``.rels``/``.vml`` part's prolog is read through
  defusedxml with ``forbid_dtd=True`` up to its root element, so entity bombs ("billion laughs",
  external entities) are refused after reading a few bytes of the part.

The declared sizes are binding: Python's zipfile (which openpyxl, ``formulas`` and
:mod:`stillair.addin.workbook.reader` all read through) never returns more than a member's declared size and fails
on the CRC when the data is longer, so checking the directory is enough to bound the work.

While a workbook is calculated, :func:`offline` keeps one promise: no network connection is
opened (socket connects and name look-ups raise :class:`UnsafeWorkbook`).  No other workbook is
ever loaded: stillair reads the one file itself (``formulas``' own workbook loader, which would
open the files external links point to, is never used), and a reference into another workbook
is a cell that cannot be evaluated.
Macros are never run: nothing here (or in ``formulas``) executes VBA; ``vbaProject.bin`` is
copied or ignored as bytes.
"""

from __future__ import annotations

import contextlib
import socket
import threading
import zipfile
from dataclasses import dataclass

from defusedxml import DefusedXmlException
from defusedxml.ElementTree import DefusedXMLParser, ParseError, fromstring

__all__ = ["UnsafeWorkbook", "Limits", "LIMITS", "open_package", "check_package", "check_archive",
           "parse_xml", "offline", "openpyxl_uses_defusedxml"]

MiB = 1024 * 1024


class UnsafeWorkbook(ValueError):
    """The file is refused before it is read; the message is one line for the user."""


@dataclass(frozen=True)
class Limits:
    """What a workbook may declare.  Generous for calculation workbooks, tiny for a bomb."""

    max_members: int = 10_000
    max_member_bytes: int = 100 * MiB     # one uncompressed part (a sheet's XML)
    max_total_bytes: int = 300 * MiB      # all parts together, uncompressed
    max_ratio: float = 200.0              # uncompressed / compressed, per member ...
    ratio_floor: int = 1 * MiB            # ... for members larger than this uncompressed
    prolog_bytes: int = 64 * 1024         # how far to read a part looking for its root element


LIMITS = Limits()

_XML_SUFFIXES = (".xml", ".rels", ".vml")
_OLE_SIGNATURE = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1"


def _size(n: int) -> str:
    return f"{n / MiB:.0f} MiB" if n >= MiB else f"{n} bytes"


def openpyxl_uses_defusedxml() -> bool:
    """openpyxl switches to defusedxml when it is installed; this says whether it did."""
    import openpyxl.xml
    return bool(openpyxl.xml.DEFUSEDXML)


def check_archive(archive: zipfile.ZipFile, label: str, limits: Limits = LIMITS) -> None:
    """Raise :class:`UnsafeWorkbook` unless the open archive keeps within ``limits``."""
    infos = archive.infolist()
    if len(infos) > limits.max_members:
        raise UnsafeWorkbook(f"{label}: refused: {len(infos)} zip members, more than the limit of "
                             f"{limits.max_members}")
    total = 0
    for info in infos:
        if info.flag_bits & 0x1:
            raise UnsafeWorkbook(f"{label}: refused: zip member {info.filename} is encrypted")
        if info.file_size > limits.max_member_bytes:
            raise UnsafeWorkbook(f"{label}: refused: zip member {info.filename} would expand to "
                                 f"{_size(info.file_size)}, more than the limit of "
                                 f"{_size(limits.max_member_bytes)}")
        total += info.file_size
        if total > limits.max_total_bytes:
            raise UnsafeWorkbook(f"{label}: refused: the zip members would expand to more than "
                                 f"{_size(limits.max_total_bytes)} in total")
        if info.file_size > limits.ratio_floor:
            ratio = info.file_size / max(info.compress_size, 1)
            if ratio > limits.max_ratio:
                raise UnsafeWorkbook(f"{label}: refused: zip member {info.filename} has a "
                                     f"compression ratio of {ratio:.0f}:1 (limit "
                                     f"{limits.max_ratio:.0f}:1), typical of a zip bomb")
    for info in infos:
        if info.filename.lower().endswith(_XML_SUFFIXES) and not info.is_dir():
            _check_prolog(archive, info, label, limits)


class _RootReached(Exception):
    pass


class _StopAtRoot:
    """ElementTree parser target that stops at the root element: the prolog is all we check."""

    def start(self, tag, attrib):
        raise _RootReached

    def close(self):
        return None


def _check_prolog(archive: zipfile.ZipFile, info: zipfile.ZipInfo, label: str,
                  limits: Limits) -> None:
    parser = DefusedXMLParser(target=_StopAtRoot(), forbid_dtd=True, forbid_entities=True,
                              forbid_external=True)
    read = 0
    try:
        with archive.open(info) as stream:
            while read < limits.prolog_bytes:
                chunk = stream.read(4096)
                if not chunk:
                    break
                read += len(chunk)
                parser.feed(chunk)
    except _RootReached:
        return
    except DefusedXmlException as error:
        raise UnsafeWorkbook(f"{label}: refused: {info.filename} declares a DTD or entities "
                             f"({type(error).__name__}); workbooks never need one") from None
    except ParseError as error:
        raise UnsafeWorkbook(f"{label}: damaged workbook: {info.filename} is not well-formed XML "
                             f"({error})") from None
    except (zipfile.BadZipFile, OSError, EOFError, NotImplementedError) as error:
        raise UnsafeWorkbook(f"{label}: damaged workbook: cannot read {info.filename} "
                             f"({error})") from None
    if read == 0:
        return  # an empty part; whoever needs it reports it
    # No root element within the first prolog_bytes: a prolog that long is not a workbook's.
    raise UnsafeWorkbook(f"{label}: refused: {info.filename} has no root element in its first "
                         f"{_size(limits.prolog_bytes)}")


def open_package(path: str, limits: Limits = LIMITS) -> zipfile.ZipFile:
    """Open ``path`` as a zip package after every check; raises :class:`UnsafeWorkbook`."""
    try:
        with open(path, "rb") as handle:
            head = handle.read(8)
    except FileNotFoundError:
        raise UnsafeWorkbook(f"{path}: no such file") from None
    except IsADirectoryError:
        raise UnsafeWorkbook(f"{path}: is a directory, not a workbook") from None
    except OSError as error:
        raise UnsafeWorkbook(f"{path}: cannot read ({error.strerror or error})") from None
    if head == _OLE_SIGNATURE:
        raise UnsafeWorkbook(f"{path}: an encrypted (password-protected) or legacy .xls workbook; "
                             "save it unprotected as .xlsx or .xlsm")
    try:
        archive = zipfile.ZipFile(path)
    except (zipfile.BadZipFile, OSError, ValueError, EOFError) as error:
        raise UnsafeWorkbook(f"{path}: not an .xlsx/.xlsm workbook ({error})") from None
    try:
        check_archive(archive, path, limits)
    except BaseException:
        archive.close()
        raise
    return archive


def check_package(path: str, limits: Limits = LIMITS) -> None:
    """Check ``path`` without keeping it open."""
    open_package(path, limits).close()


def parse_xml(data: bytes):
    """Parse one (size-checked) part with defusedxml: no DTD, no entities, no external access."""
    try:
        return fromstring(data, forbid_dtd=True)
    except DefusedXmlException as error:
        raise UnsafeWorkbook(f"refused XML ({type(error).__name__})") from None
    except ParseError as error:
        raise UnsafeWorkbook(f"damaged XML ({error})") from None


# ---------------------------------------------------------------------------------------------
# Run-time guards while a workbook is evaluated.

_lock = threading.RLock()


@contextlib.contextmanager
def offline():
    """No network while active: socket connects and name look-ups raise UnsafeWorkbook."""

    def refuse(*args, **kwargs):
        raise UnsafeWorkbook("refused: something tried to open a network connection while "
                             "reading the workbook")

    patched = [(socket, "create_connection"), (socket, "getaddrinfo")]
    if isinstance(socket.socket, type):
        patched += [(socket.socket, "connect"), (socket.socket, "connect_ex")]
    missing = object()
    with _lock:
        saved = [(owner, name, vars(owner).get(name, missing)) for owner, name in patched]
        try:
            for owner, name in patched:
                setattr(owner, name, refuse)
            yield
        finally:
            for owner, name, original in saved:
                if original is missing:
                    delattr(owner, name)      # it was inherited (from _socket.socket)
                else:
                    setattr(owner, name, original)
