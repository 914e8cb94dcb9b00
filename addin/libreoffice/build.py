"""Building the LibreOffice extension (.oxt) from the cell-function registry.

Everything in the extension is generated here from :data:`stillair.addin.cells.registry.REGISTRY` at
build time, except the component (``stillair_calc.py``, shipped as it is):

* ``stillair.idl`` -> ``stillair.rdb``: one UNO interface with one method per cell function
  (every argument ``any``, so Calc passes blanks as void and ranges as arrays; the result a 2-D
  array where it may be one, see :func:`returns_array`); the type library
  is compiled by the LibreOffice SDK's ``unoidl-write`` against LibreOffice's own types;
* ``stillair_functions.json``: names, descriptions, argument names and descriptions, categories
  and result kinds for the Function Wizard, plus the Python paths that import stillair;
* ``Jobs.xcu``: runs the component's load job, which rebinds the calls in Excel workbooks;
* ``stillair.components``, ``META-INF/manifest.xml``, ``description.xml``.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
import sysconfig
import tempfile
import zipfile
from importlib import resources
from pathlib import Path
from xml.sax.saxutils import escape

from ..cells.registry import REGISTRY, CellFunction, arg_doc  # the words Excel's wizard shows

__all__ = ["IDENTIFIER", "IMPLEMENTATION", "INTERFACE", "ToolMissing",
           "returns_array", "idl_source", "function_spec", "python_paths", "find_program_dir", "find_unoidl_write",
           "build_oxt"]

IDENTIFIER = "org.stillair.calc"              # the extension's identifier (unopkg list / update)
IMPLEMENTATION = "org.stillair.calc.Functions"  # the add-in's implementation and service name
REBIND_IMPLEMENTATION = "org.stillair.calc.RebindExcelCalls"  # the job run on loading a workbook
INTERFACE = "org.stillair.calc.XStillairFunctions"
# Calc files add-in functions under its own fixed categories; ours go under "Add-In", and the
# registry's category is shown in front of each description.
WIZARD_CATEGORY = "Add-In"


class ToolMissing(RuntimeError):
    """A LibreOffice program or SDK tool needed for the build is not installed."""


def returns_array(entry: CellFunction) -> bool:
    """True when the method is declared to return a 2-D array: a table, or a function whose
    numeric arguments may be ranges (its result is then an array of the broadcast shape).

    A Calc add-in method declared ``any`` can return a number or a text, but not an array from
    Python: pyuno hands a tuple of tuples over as a sequence of ``any`` (each row one more
    ``any``), which is not one of the array types Calc accepts (``sequence< sequence< any > >``,
    ``... double``, ``... string``, ``... long``), so the cell shows #VALUE!; and pyuno refuses a
    ``uno.Any`` as a return value.  Declared ``sequence< sequence< any > >``, the result is
    converted to that type on its way out, and a single value goes back as a 1x1 array, which
    Calc shows as that value in a single cell, in an expression, and in every cell of an array
    formula."""
    return entry.result == "table" or entry.takes_arrays


def _idl_type(entry: CellFunction) -> str:
    return "sequence< sequence< any > >" if returns_array(entry) else "any"


# Calc marks an add-in argument declared ``any`` optional in the Function Wizard, whatever the
# add-in says (sc/source/core/tool/addincol.cxx: optional exactly for "value or array" and
# varargs arguments).  A required argument is declared ``sequence< sequence< any > >`` (a mixed
# array: a single value arrives as 1x1, a range as itself), which the Wizard shows as required;
# the component unwraps the 1x1 (stillair_calc._arguments).
REQUIRED_ARGUMENT_TYPE = "sequence< sequence< any > >"


def _argument_type(arg) -> str:
    return "any" if arg.optional else REQUIRED_ARGUMENT_TYPE


def idl_source() -> str:
    """The UNO IDL of the add-in's interface: one method per registry entry.

    Argument names in the IDL are positional (``a0, a1...``): the names users see come from the
    registry through XAddIn, and positional names cannot collide with IDL keywords."""
    module, _, interface = INTERFACE.rpartition(".")
    lines = ["#include <com/sun/star/uno/XInterface.idl>", ""]
    parts = module.split(".")
    lines.append(" ".join(f"module {p} {{" for p in parts))
    lines.append(f"interface {interface} : com::sun::star::uno::XInterface")
    lines.append("{")
    for entry in REGISTRY:
        args = ", ".join(f"[in] {_argument_type(a)} a{i}" for i, a in enumerate(entry.args))
        lines.append(f"    {_idl_type(entry)} {entry.name}({args});")
    lines.append("};")
    lines.append(" ".join("};" for _ in parts))
    return "\n".join(lines) + "\n"


def function_spec(paths: dict | None = None) -> dict:
    """The data the component reads: the Function Wizard's texts and where stillair lives."""
    import stillair

    functions = []
    for entry in REGISTRY:
        functions.append({
            "name": entry.name,
            "category": entry.category,
            "description": f"[{entry.category}] {entry.description}",
            "result": entry.result,
            "array_result": returns_array(entry),
            "args": [{"name": a.name, "doc": arg_doc(a), "optional": a.optional, "kind": a.kind}
                     for a in entry.args],
        })
    return {"implementation": IMPLEMENTATION, "rebind_implementation": REBIND_IMPLEMENTATION,
            "stillair_version": stillair.__version__,
            "wizard_category": WIZARD_CATEGORY, "python": paths or python_paths(),
            "functions": functions}


def python_paths() -> dict:
    """Where this Python finds stillair and its dependencies (recorded into the extension).

    Only this environment's site-packages folders (with their .pth files, which is how an
    editable install is found), the user site-packages and PYTHONPATH: never this Python's
    standard library, which LibreOffice's Python has in its own version."""
    import site

    import stillair

    site_dirs = []
    candidates = [sysconfig.get_paths()[key] for key in ("purelib", "platlib")]
    if site.ENABLE_USER_SITE:
        candidates.append(site.getusersitepackages())
    for directory in candidates:
        if directory not in site_dirs and os.path.isdir(directory):
            site_dirs.append(directory)
    extra = [p for p in os.environ.get("PYTHONPATH", "").split(os.pathsep) if p and os.path.isdir(p)]
    return {"executable": sys.executable, "version": "%d.%d" % sys.version_info[:2],
            "full_version": sys.version.split()[0], "site_dirs": site_dirs,
            "paths": [os.path.abspath(p) for p in extra] + site_dirs,
            "stillair": str(Path(stillair.__file__).resolve().parent)}


def find_program_dir() -> Path:
    """LibreOffice's program folder (holds soffice, unopkg and types.rdb)."""
    candidates = []
    if os.environ.get("STILLAIR_LIBREOFFICE_PROGRAM"):
        candidates.append(Path(os.environ["STILLAIR_LIBREOFFICE_PROGRAM"]))
    for name in ("soffice", "libreoffice"):
        found = shutil.which(name)
        if found:
            candidates.append(Path(os.path.realpath(found)).parent)
    candidates += [Path("/usr/lib/libreoffice/program"), Path("/opt/libreoffice/program"),
                   Path("/Applications/LibreOffice.app/Contents/MacOS")]
    for candidate in candidates:
        if (candidate / "types.rdb").exists() or (candidate / "soffice.bin").exists():
            return candidate
    raise ToolMissing("LibreOffice is not installed (no soffice found); on Debian or Ubuntu: "
                      "apt-get install libreoffice-calc python3-uno libreoffice-script-provider-python")


def find_unoidl_write(program_dir: Path) -> Path:
    candidates = [shutil.which("unoidl-write")]
    for sdk in (program_dir.parent / "sdk" / "bin", Path("/usr/lib/libreoffice/sdk/bin"),
                program_dir / "sdk" / "bin"):
        candidates.append(str(sdk / "unoidl-write"))
    for candidate in candidates:
        if candidate and os.path.isfile(candidate) and os.access(candidate, os.X_OK):
            return Path(candidate)
    raise ToolMissing("the LibreOffice SDK tool unoidl-write is needed to build the extension's "
                      "type library; on Debian or Ubuntu: apt-get install libreoffice-dev")


def _type_libraries(program_dir: Path) -> list[Path]:
    found = [program_dir / "types.rdb", program_dir / "types" / "offapi.rdb"]
    for path in found:
        if not path.exists():
            raise ToolMissing(f"LibreOffice's type library {path} is missing")
    return found


def compile_idl(idl: str, out: Path, program_dir: Path | None = None) -> None:
    program_dir = program_dir or find_program_dir()
    tool = find_unoidl_write(program_dir)
    with tempfile.TemporaryDirectory(prefix="stillair-idl-") as directory:
        source = Path(directory) / "stillair.idl"
        source.write_text(idl, encoding="utf-8")
        done = subprocess.run([str(tool), *map(str, _type_libraries(program_dir)), str(source), str(out)],
                              capture_output=True, text=True)
    if done.returncode != 0 or not out.exists():
        raise RuntimeError(f"unoidl-write failed: {(done.stderr or done.stdout).strip()[:500]}")


def _components() -> str:
    return ('<?xml version="1.0" encoding="UTF-8"?>\n'
            '<components xmlns="http://openoffice.org/2010/uno-components">\n'
            '  <component loader="com.sun.star.loader.Python" uri="stillair_calc.py">\n'
            f'    <implementation name="{IMPLEMENTATION}">\n'
            '      <service name="com.sun.star.sheet.AddIn"/>\n'
            '    </implementation>\n'
            f'    <implementation name="{REBIND_IMPLEMENTATION}">\n'
            '      <service name="com.sun.star.task.Job"/>\n'
            '    </implementation>\n'
            '  </component>\n'
            '</components>\n')


def _jobs() -> str:
    """Run the rebinding job whenever a document has finished loading."""
    return ('<?xml version="1.0" encoding="UTF-8"?>\n'
            '<oor:component-data xmlns:oor="http://openoffice.org/2001/registry" '
            'xmlns:xs="http://www.w3.org/2001/XMLSchema" oor:name="Jobs" oor:package="org.openoffice.Office">\n'
            ' <node oor:name="Jobs">\n'
            f'  <node oor:name="{REBIND_IMPLEMENTATION}" oor:op="replace">\n'
            f'   <prop oor:name="Service"><value>{REBIND_IMPLEMENTATION}</value></prop>\n'
            '  </node>\n'
            ' </node>\n'
            ' <node oor:name="Events">\n'
            '  <node oor:name="OnLoadFinished" oor:op="fuse">\n'
            '   <node oor:name="JobList">\n'
            f'    <node oor:name="{REBIND_IMPLEMENTATION}" oor:op="replace"/>\n'
            '   </node>\n'
            '  </node>\n'
            ' </node>\n'
            '</oor:component-data>\n')


def _manifest() -> str:
    entries = [("application/vnd.sun.star.uno-typelibrary;type=RDB", "stillair.rdb"),
               ("application/vnd.sun.star.uno-components", "stillair.components"),
               ("application/vnd.sun.star.configuration-data", "Jobs.xcu")]
    body = "".join(f' <manifest:file-entry manifest:media-type="{t}" manifest:full-path="{p}"/>\n'
                   for t, p in entries)
    return ('<?xml version="1.0" encoding="UTF-8"?>\n'
            '<manifest:manifest xmlns:manifest="http://openoffice.org/2001/manifest">\n'
            f"{body}</manifest:manifest>\n")


def _description(version: str) -> str:
    return ('<?xml version="1.0" encoding="UTF-8"?>\n'
            '<description xmlns="http://openoffice.org/extensions/description/2006" '
            'xmlns:xlink="http://www.w3.org/1999/xlink" '
            'xmlns:dep="http://openoffice.org/extensions/description/2006">\n'
            f'  <identifier value="{IDENTIFIER}"/>\n'
            f'  <version value="{escape(version)}"/>\n'
            '  <display-name><name lang="en">stillair cell functions</name></display-name>\n'
            '  <dependencies>\n'
            '    <lo:LibreOffice-minimal-version xmlns:lo="http://libreoffice.org/extensions/description/2011" '
            'lo:name="LibreOffice 7.4" value="7.4"/>\n'
            '  </dependencies>\n'
            '</description>\n')


def build_oxt(target: Path, *, paths: dict | None = None, program_dir: Path | None = None) -> dict:
    """Write the extension to ``target`` (which must not exist); returns the function spec."""
    target = Path(target)
    if target.exists():
        raise FileExistsError(f"{target} exists; stillair never writes over an existing file")
    spec = function_spec(paths)
    idl = idl_source()
    component = resources.files(__package__).joinpath("stillair_calc.py").read_text(encoding="utf-8")
    with tempfile.TemporaryDirectory(prefix="stillair-oxt-") as directory:
        rdb = Path(directory) / "stillair.rdb"
        compile_idl(idl, rdb, program_dir)
        members = {
            "META-INF/manifest.xml": _manifest(),
            "description.xml": _description(spec["stillair_version"]),
            "stillair.components": _components(),
            "Jobs.xcu": _jobs(),
            "stillair_calc.py": component,
            "stillair_functions.json": json.dumps(spec, indent=1, ensure_ascii=False),
            "stillair.idl": idl,
        }
        try:  # mode "x": fails rather than replace a file created meanwhile
            with zipfile.ZipFile(target, "x", zipfile.ZIP_DEFLATED) as oxt:
                for name, text in members.items():
                    oxt.writestr(name, text.encode("utf-8"))
                oxt.write(rdb, "stillair.rdb")
        except FileExistsError:
            raise
        except BaseException:
            target.unlink(missing_ok=True)  # no half-written extension left behind
            raise
    return spec
