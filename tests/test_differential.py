"""LibreOffice as the oracle: seeded workbooks of many shapes, typed into LibreOffice with our
extension installed, calculated and saved as .xlsx by it, then calculated headlessly from the
saved file; every formula cell must agree with LibreOffice's value (1e-12 relative, text and
errors exactly) or be one of the DOCUMENTED differences below.

Shapes: our functions with literal, referenced, omitted and range arguments and error
messages; built-ins of the categories we claim (arithmetic, math, logic, text, counting and
testing cells, reference functions, lookups, errors); defined names; ranges past the used range
(a network table passed generously); intersections; an iterative loop (compared within the
workbook's delta, the rule both programs follow).
"""

from __future__ import annotations

import math
import random

import pytest

from stillair.addin.cells.callpath import call
from stillair.addin.workbook.model import evaluate_book
from test_libreoffice import installation, lo_value, run_session  # noqa: F401  (fixture)

pytestmark = pytest.mark.slow  # drives LibreOffice with the extension installed

SEEDS = range(12)
RTOL = 1e-12

# Differences between LibreOffice and Excel that stillair follows Excel in; each generated cell
# that shows one carries its key, and the test checks the documented behaviour of both.
DOCUMENTED = {
    "empty-reference-argument": "a reference to an EMPTY cell as an argument of one of our "
    "functions: LibreOffice passes 0 (so H_CAVITY's tilt is 0 degrees); Excel through xlwings "
    "and stillair calc pass a blank, so the argument's default applies (tilt 90)",
    "loop-through-our-functions": "a circular loop through one of our functions (the trade's "
    "wall-temperature sheet): LibreOffice 7.4 answers Err:523 (not converged) even with 1000 "
    "sweeps and delta 1e-3 - measured; our functions are declared to return arrays there, "
    "which its iteration does not settle; stillair calc converges to the loop's energy balance "
    "(checked against scipy's brentq below). A loop of built-ins agrees within the delta.",
}


def _inputs(rng: random.Random) -> dict:
    """A1:A8 inputs (a blank gap at A9:A29, A30 empty on purpose), text in A6 and A7."""
    return {"A1": round(rng.uniform(30.0, 80.0), 3), "A2": round(rng.uniform(-5.0, 25.0), 3),
            "A3": round(rng.uniform(0.05, 1.5), 4), "A4": round(rng.uniform(0.008, 0.05), 4),
            "A5": round(rng.uniform(1.0, 100.0), 2), "A6": rng.choice(["air", "argon", "krypton"]),
            "A7": "text", "A8": round(rng.uniform(0.1, 0.95), 3)}


# (LibreOffice formula text, documented-difference key or None); inputs in A1:A8, names inp/rng.
FORMULAS = [
    ("=AIR_DENSITY(A1)", None), ("=AIR_CONDUCTIVITY(A2)", None),
    ("=GAS_PRANDTL(A6;A1)", None), ("=H_VPLATE(A1;A2;A3)", None),
    ("=H_VPLATE(A1;A2;A3;;;)", None), ('=H_VPLATE(A1;A2;A3;A6;101325;"churchill-chu")', None),
    ("=H_CAVITY(A1;A2;A4;A3)", None), ("=H_CAVITY(A1;A2;A4;A3;;A6)", None),
    ("=H_CAVITY(A1;A2;A4;A3;60)", None), ("=H_RAD(A1;A2;A8;0.9)", None),
    ("=NU_VPLATE(1E7*A3;0.71)", None), ('=AIR_DENSITY("x")', None), ("=NU_VPLATE(-1;0.7)", None),
    ("=H_HCYL(A1;A2;A4)", None), ("=H_SPHERE(A1;A2;A3)", None),
    ("=H_CAVITY(A1;A2;A4;A3;A30)", "empty-reference-argument"),
    ("=SUM(A1:A8)", None), ("=AVERAGE(A1:A5)", None), ("=MAX(A1:A40)", None),
    ("=MIN(A1:A5)", None), ("=ROUND(A1*3.7;2)", None), ("=SQRT(ABS(A2))", None),
    ("=EXP(A3)", None), ("=LN(A5)", None), ("=POWER(A3;1.5)", None), ("=MOD(A5;7)", None),
    ('=IF(A1>A2;"hot";"cold")', None), ("=AND(A1>0;A2>0)", None), ("=OR(A2<0;A3>1)", None),
    ("=NOT(A1>A2)", None), ("=COUNTA(A1:A40)", None), ("=COUNTBLANK(A1:A40)", None),
    ("=COUNT(A1:A40)", None), ('=COUNTIF(A1:A40;">10")', None), ('=SUMIF(A1:A40;">10")', None),
    ('=COUNTIFS(A1:A40;"";B1:B40;"")', None), ("=ROWS(A1:C50)", None),
    ("=COLUMNS(A1:Z1)", None), ("=ROW(C112)", None), ("=COLUMN(D5)", None),
    ("=ISBLANK(A30)", None), ("=ISNUMBER(A5)", None), ("=ISTEXT(A6)", None),
    ("=ISREF(A1)", None), ("=LEN(A6)", None), ('=A6&"-"&A7', None), ("=UPPER(A6)", None),
    ("=INDEX(A1:A8;3)", None), ("=A30+1", None), ('=A30&"x"', None), ("=A30", None),
    ("=IFERROR(1/0;-1)", None), ("=1/0", None), ("=NA()", None), ("=ISERROR(1/0)", None),
    ("=SUM(A1:A4!A3:A8)", None), ("=inp*2", None), ("=SUM(rng)", None),
    ("=H_VPLATE(inp;A2;A3)", None), ("=SUMPRODUCT(A1:A3;A3:A5)", None),
    ("=ABS(A2)-INT(A2)", None), ("=A1^2-A2^2", None),
]


def _network(rng: random.Random) -> tuple[dict, dict]:
    """A two-branch wall typed into H1:L3 (columns M..Q never typed), passed as H1:Q4."""
    r1, r2 = round(rng.uniform(0.01, 0.5), 4), round(rng.uniform(0.01, 0.5), 4)
    t1, t2 = round(rng.uniform(40, 90), 2), round(rng.uniform(-10, 20), 2)
    cells = {"H1": "b1", "I1": "hot", "J1": "mid", "K1": "resistance", "L1": r1,
             "H2": "b2", "I2": "mid", "J2": "cold", "K2": "resistance", "L2": r2,
             "H6": "hot", "I6": "T", "J6": t1, "H7": "cold", "I7": "T", "J7": t2}
    formulas = {"E1": '=NET_HEAT(H1:Q4;H6:J9;"b1")', "E2": '=NET_TEMP(H1:Q4;H6:J9;"mid")',
                "E3": "=NET_CHECK(H1:Q4;H6:J9)"}
    return cells, formulas


def _book(seed: int, folder) -> tuple[dict, dict]:
    rng = random.Random(seed)
    cells = dict(_inputs(rng))
    chosen = rng.sample(FORMULAS, k=len(FORMULAS) * 2 // 3)
    tags = {}
    for index, (formula, tag) in enumerate(chosen):
        ref = f"C{index + 1}"
        cells[ref] = formula
        tags[ref] = tag
    network_cells, network_formulas = _network(rng)
    cells.update(network_cells)
    cells.update(network_formulas)
    tags.update({ref: None for ref in network_formulas})
    job = {"type": {"Sheet1": cells}, "arrays": {}, "save": str(folder / f"book-{seed}.xlsx"),
           "names": {"inp": "$Sheet1.$A$1", "rng": "$Sheet1.$A$1:$A$5"}}
    return job, tags


def _loop_book(folder) -> dict:
    """The trade's iterative sheet: a plate's wall temperature guessed, h from it, and the wall
    temperature that follows, with a first guess of 50 degC while h is still 0 (as such sheets
    start); LibreOffice iterates it (count 100, delta 1e-7)."""
    cells = {"A1": 40.0, "A2": 0.3, "A3": 0.25, "A4": 25.0, "A5": 0.9,
             "B1": "=IF(B2+B3=0;50;A4+A1/((B2+B3)*A2*A3))", "B2": "=H_VPLATE(B1;A4;A2)",
             "B3": "=H_RAD(B1;A4;A5;1)", "B4": "=(B2+B3)*A2*A3*(B1-A4)",
             "C1": "=1+C2/2", "C2": "=C1/2"}
    return {"type": {"Sheet1": cells}, "arrays": {}, "save": str(folder / "loop.xlsx"),
            "iterate": [100, 1e-7]}


def _plain(value):
    if isinstance(value, bool):
        return float(value)
    return "" if value is None else value


def _agree(expected, actual, rtol=RTOL, atol=0.0) -> bool:
    if isinstance(expected, float) and isinstance(actual, float):
        return abs(expected - actual) <= max(rtol * max(abs(expected), abs(actual)), atol)
    return expected == actual


@pytest.fixture(scope="module")
def compared(installation, tmp_path_factory):  # noqa: F811
    folder = tmp_path_factory.mktemp("differential")
    jobs, tags = [], []
    for seed in SEEDS:
        job, tag = _book(seed, folder)
        jobs.append(job)
        tags.append(tag)
    jobs.append(_loop_book(folder))
    tags.append({**{ref: "loop-through-our-functions" for ref in ("B1", "B2", "B3", "B4")},
                 **{ref: "loop" for ref in ("C1", "C2")}})
    results = run_session(installation, jobs, folder)
    rows = []
    for job, tag, result in zip(jobs, tags, results):
        evaluation = evaluate_book(job["save"])
        lo = result["sheets"]["Sheet1"]
        for ref, key in tag.items():
            ours = evaluation.values["Sheet1"].get(ref)
            rows.append((job["save"], ref, lo[ref]["formula"], lo_value(lo[ref]), _plain(ours), key))
    return rows


def test_every_cell_agrees_with_libreoffice_or_is_a_documented_difference(compared, capsys):
    disagree = []
    for path, ref, formula, lo, ours, key in compared:
        if key in DOCUMENTED:
            continue                      # checked on their own below
        if key == "loop":
            if not _agree(lo, ours, rtol=0.0, atol=1e-7):
                disagree.append((path, ref, formula, lo, ours))
            continue
        if not _agree(lo, ours):
            disagree.append((path, ref, formula, lo, ours))
    with capsys.disabled():
        print(f"\ndifferential test: {len(compared)} formula cells in {len(SEEDS) + 1} workbooks "
              f"(LibreOffice with the extension against stillair calc on its saved file)")
    assert disagree == []
    assert len(compared) >= 400


def test_the_documented_difference_is_what_the_table_says(compared):
    found = [row for row in compared if row[5] == "empty-reference-argument"]
    assert found, "the seeds generate the documented case"
    for path, ref, formula, lo, ours, key in found:
        book = evaluate_book(path).book.sheet("Sheet1").values
        args = (book["A1"], book["A2"], book["A4"], book["A3"])
        assert math.isclose(lo, call("H_CAVITY", *args, 0.0), rel_tol=RTOL)
        assert math.isclose(ours, call("H_CAVITY", *args), rel_tol=RTOL)



def test_the_loop_through_our_functions_is_the_documented_difference(compared):
    from scipy.optimize import brentq

    loop = {row[1]: row for row in compared if row[5] == "loop-through-our-functions"}
    assert loop["B1"][3] == "Err:523"          # LibreOffice: did not converge (measured)

    def balance(tw):                           # Q - (h_conv + h_rad) A (Tw - Ta)
        h = call("H_VPLATE", tw, 25.0, 0.3) + call("H_RAD", tw, 25.0, 0.9, 1.0)
        return 40.0 - h * 0.3 * 0.25 * (tw - 25.0)

    assert abs(loop["B1"][4] - brentq(balance, 26.0, 300.0, xtol=1e-12)) <= 1e-5
    assert math.isclose(loop["B4"][4], 40.0, rel_tol=1e-6)
