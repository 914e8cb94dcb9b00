"""Template: a sealed outdoor cabinet through a day.

The sealed cabinet's network (internal air, inner and outer faces of the sides and of the top,
ambient, sky) with the cabinet's heat capacities on its nodes, the sun and the ambient following
a clear day, solved through the day by the transient network functions.  Results: the peak
internal air temperature and its time against the steady result at peak sun and the maximum
ambient, the night minimum of the inner walls, a chart of the day.
"""

from __future__ import annotations

import math
from types import SimpleNamespace

from xlsxwriter.utility import xl_rowcol_to_cell

from .book import limit_check
from .sealed_cabinet import (CONDENSATION_FAILS, SIZE, SUN, VPLATE_METHODS, branch_rows, condensation_check,
                             moisture_inputs)
from .spec import EMISSIVITY, LIMIT_TEMPERATURE, Template, Valid, altitude

NAME = "cabinet-day"
HOURS = range(25)               # series points: every hour of the day, 0 to 24 h
OUTPUT_STEP = 600.0             # s between output times (10 minutes)
OUTPUT_TIMES = [k * OUTPUT_STEP for k in range(int(86400 / OUTPUT_STEP) + 1)]
TIMES_PER_ROW = 10              # the output times as a block of ten columns, read row by row
CHART_EVERY = 3                 # every third output time in the chart table (30 minutes)
NODES = ("side_in", "air_in", "top_in", "side_out", "top_out", "ambient", "sky")   # the table's order
SERIES = ("sun_top", "sun_sides", "ambient", "sky")

DEFAULTS = dict(cab_height=1.6, cab_width=0.8, cab_depth=0.6, wall_thickness=0.002, wall_k=45.0, emissivity=0.9,
                wall_density=7850.0, wall_cp=460.0, equipment_c=100000.0, dissipation=150.0, absorptance=0.3,
                sun_top_peak=900.0, sun_sides_peak=200.0, sunrise=6.0, sunset=18.0, ambient_min=18.0,
                ambient_max=32.0, ambient_max_hour=15.0, sky_depression=12.0)


# ---------------------------------------------------------------------------------------------
# The day's tables, written once: as sheet formulas (the template) and as numbers (the tests and
# the benchmark).  Each formula reads like the number beside it.


def sun_factor(hour, sunrise, sunset):
    """Clear-day sun as a fraction of its peak: a half sine between sunrise and sunset."""
    if not sunrise < hour < sunset:
        return 0.0
    return math.sin(math.pi * (hour - sunrise) / (sunset - sunrise))


def ambient_at(hour, low, high, max_hour):
    """Air temperature as a sine between the day's minimum and maximum, highest at max_hour."""
    return (low + high) / 2 + (high - low) / 2 * math.cos(2 * math.pi * (hour - max_hour) / 24)


def series_rows(v=None):
    """series | time s | value: formulas of the input names, or numbers from the inputs ``v``."""
    rows = []
    for hour in HOURS:
        if v is None:
            sun = f"IF(AND({hour}>sunrise,{hour}<sunset),SIN(PI()*({hour}-sunrise)/(sunset-sunrise)),0)"
            ambient = f"(ambient_min+ambient_max)/2+(ambient_max-ambient_min)/2*COS(2*PI()*({hour}-ambient_max_hour)/24)"
            values = [f"=absorptance*sun_top_peak*top_area*{sun}", f"=absorptance*sun_sides_peak*side_area*{sun}",
                      f"={ambient}", f"={ambient}-sky_depression"]
        else:
            sun = sun_factor(hour, v["sunrise"], v["sunset"])
            ambient = ambient_at(hour, v["ambient_min"], v["ambient_max"], v["ambient_max_hour"])
            values = [v["absorptance"] * v["sun_top_peak"] * v["top_area"] * sun,
                      v["absorptance"] * v["sun_sides_peak"] * v["side_area"] * sun, ambient,
                      ambient - v["sky_depression"]]
        rows += [[label, hour * 3600.0, value] for label, value in zip(SERIES, values)]
    return rows


def day_boundaries(dissipation):
    """The boundaries through the day: the sun and the surroundings name their series."""
    return [["air_in", "Q", dissipation], ["side_out", "Q", "sun_sides"], ["top_out", "Q", "sun_top"],
            ["ambient", "T", "ambient"], ["sky", "T", "sky"]]


def capacity_rows(*, air, side_face, top_face):
    """Air and equipment on the internal air node; half of each wall's mass on each of its faces."""
    return [["air_in", air], ["side_in", side_face], ["side_out", side_face], ["top_in", top_face],
            ["top_out", top_face]]


def day_network(**changes):
    """The template's network at its default inputs (or changed ones) as numbers: branches,
    boundaries, capacities, series, the steady peak boundaries, and the derived inputs."""
    import stillair

    v = dict(DEFAULTS, **changes)
    v["side_area"] = 2 * (v["cab_width"] + v["cab_depth"]) * v["cab_height"]
    v["top_area"] = v["cab_width"] * v["cab_depth"]
    v["pressure"] = stillair.altitude_pressure(changes.get("altitude", 0.0))
    mean = (v["ambient_min"] + v["ambient_max"]) / 2
    air = (stillair.air_density(mean, v["pressure"]) * stillair.air_cp(mean, v["pressure"])
           * v["cab_height"] * v["cab_width"] * v["cab_depth"])
    wall = v["wall_density"] * v["wall_cp"] * v["wall_thickness"]
    branches = branch_rows(height=v["cab_height"], side_area=v["side_area"], top_area=v["top_area"],
                           top_length=v["top_area"] / (2 * (v["cab_width"] + v["cab_depth"])),
                           wall_thickness=v["wall_thickness"], wall_k=v["wall_k"], emissivity=v["emissivity"],
                           method=changes.get("vplate_method"))
    peak = [["air_in", "Q", v["dissipation"]], ["side_out", "Q", v["absorptance"] * v["sun_sides_peak"] * v["side_area"]],
            ["top_out", "Q", v["absorptance"] * v["sun_top_peak"] * v["top_area"]],
            ["ambient", "T", v["ambient_max"]], ["sky", "T", v["ambient_max"] - v["sky_depression"]]]
    return SimpleNamespace(
        branches=branches, boundaries=day_boundaries(v["dissipation"]), peak_boundaries=peak,
        capacities=capacity_rows(air=v["equipment_c"] + air, side_face=wall * v["side_area"] / 2,
                                 top_face=wall * v["top_area"] / 2),
        series=series_rows(v), pressure=v["pressure"], inputs=v)


HOUR_OF_DAY = Valid(0.0, 24.0, "an hour of the day, 0 to 24")


def build(b) -> None:
    # ------------------------------------------------------------------ Inputs
    d = DEFAULTS
    b.section("Inputs", "Cabinet")
    b.input("cab_height", "Cabinet height (outside)", d["cab_height"], "m", "height of the vertical side walls",
            valid=SIZE)
    b.input("cab_width", "Cabinet width (outside)", d["cab_width"], "m", valid=SIZE)
    b.input("cab_depth", "Cabinet depth (outside)", d["cab_depth"], "m", valid=SIZE)
    b.input("wall_thickness", "Wall thickness", d["wall_thickness"], "m", "sheet steel or aluminium skin",
            valid=Valid(0.0, 0.1, "a skin above 0 and at most 0.1 m thick (thicker walls are not plane skins)",
                        low_open=True))
    b.input("wall_k", "Wall conductivity", d["wall_k"], "W/(m·K)", "steel about 45-50, aluminium alloy about 150-200",
            valid=Valid(0.0, 500.0, "above 0; no wall material conducts more than about 500 W/(m·K)",
                        low_open=True))
    b.input("emissivity", "Outer surface emissivity", d["emissivity"], "-", "painted surfaces about 0.9 (long-wave)",
            valid=EMISSIVITY)
    b.section("Inputs", "Thermal mass")
    b.input("wall_density", "Wall material density", d["wall_density"], "kg/m³", "steel about 7850 (see Notes)",
            valid=Valid(100.0, 25000.0, "a solid wall material, 100 to 25000 kg/m³"))
    b.input("wall_cp", "Wall material specific heat", d["wall_cp"], "J/(kg·K)", "steel about 450-490 (see Notes)",
            valid=Valid(100.0, 5000.0, "a solid's specific heat, 100 to 5000 J/(kg·K)"))
    b.input("equipment_c", "Heat capacity of the equipment inside", d["equipment_c"], "J/K",
            "sum of mass x specific heat of racks, equipment, batteries",
            valid=Valid(0.0, 1.0e8, "not negative; 1e8 J/K is far beyond any cabinet's contents"))
    b.section("Inputs", "Heat")
    b.input("dissipation", "Internal dissipation (constant)", d["dissipation"], "W",
            "all equipment losses inside the cabinet",
            valid=Valid(0.0, 20000.0, "a dissipation is not negative; above 20 kW a sealed cabinet cannot lose it "
                        "by natural convection"))
    b.input("absorptance", "Solar absorptance of the outer finish", d["absorptance"], "-",
            "light, clean finishes about 0.2-0.4",
            valid=Valid(0.0, 1.0, "an absorptance is a fraction of the incident sun, 0 to 1"))
    b.section("Inputs", "Sun through the day (clear day)")
    b.input("sun_top_peak", "Peak solar irradiance on the top", d["sun_top_peak"], "W/m²",
            "at solar noon, from a solar resource source for the site", valid=SUN)
    b.input("sun_sides_peak", "Peak solar irradiance on the sides (mean over all four)", d["sun_sides_peak"], "W/m²",
            valid=SUN)
    b.input("sunrise", "Sunrise", d["sunrise"], "h", "solar time, hours after midnight", valid=HOUR_OF_DAY)
    b.input("sunset", "Sunset", d["sunset"], "h", "after sunrise", valid=Valid(
        0.0, 24.0, "an hour of the day after sunrise", extra=("{cell}>sunrise",),
        extra_words="and after sunrise"))
    b.section("Inputs", "Surroundings through the day")
    b.input("ambient_min", "Minimum ambient air temperature", d["ambient_min"], "°C", "shade temperature, night",
            valid=Valid(-50.0, 60.0, "an outdoor shade temperature, -50 to 60 °C"))
    b.input("ambient_max", "Maximum ambient air temperature", d["ambient_max"], "°C", "shade temperature, day",
            valid=Valid(-50.0, 60.0, "an outdoor shade temperature, -50 to 60 °C, not below the minimum",
                        extra=("{cell}>=ambient_min",), extra_words="and at least the minimum"))
    b.input("ambient_max_hour", "Hour of the maximum ambient temperature", d["ambient_max_hour"], "h",
            "mid-afternoon at most sites", valid=HOUR_OF_DAY)
    b.input("sky_depression", "Sky temperature below the ambient air", d["sky_depression"], "K",
            "effective long-wave sky, all day (see Notes)",
            valid=Valid(0.0, 40.0, "the clear sky is colder than the air, by up to about 40 K"))
    b.section("Inputs", "Moisture sealed in")
    moisture_inputs(b)
    b.section("Inputs", "Site and limit")
    b.input("altitude", "Site altitude", 0.0, "m", "sets the air pressure (standard atmosphere)", valid=altitude())
    b.input("max_internal_t", "Maximum allowed internal air temperature", 55.0, "°C",
            "from the equipment maker's rating", valid=LIMIT_TEMPERATURE)
    b.input("vplate_method", "Vertical-face correlation", "auto", "", "auto picks Churchill-Chu in its range",
            choices=VPLATE_METHODS)

    # ------------------------------------------------------------------ Calculation
    b.section("Calculation", "Geometry and air pressure")
    b.step("side_area", "Area of the four side walls", "=2*(cab_width+cab_depth)*cab_height", "m²")
    b.step("top_area", "Area of the top", "=cab_width*cab_depth", "m²")
    b.step("top_length", "Characteristic length of the top (area/perimeter)",
           "=top_area/(2*(cab_width+cab_depth))", "m")
    b.step("air_pressure", "Air pressure at the site", "=ALTITUDE_PRESSURE(altitude)", "Pa")
    b.section("Calculation", "Heat capacities (table on sheet Tables)")
    b.step("mean_ambient", "Mean ambient air temperature", "=(ambient_min+ambient_max)/2", "°C")
    b.step("air_c", "Internal air: density x cp x cabinet volume",
           '=AIR_DENSITY(mean_ambient, air_pressure)*AIR_CP(mean_ambient, air_pressure)*cab_height*cab_width*cab_depth',
           "J/K", "outside volume: the air is at most this", number_format="0")
    b.step("c_air_node", "Internal air node: air + equipment", "=air_c+equipment_c", "J/K", number_format="0")
    b.step("wall_c_area", "Wall heat capacity per area: density x cp x thickness",
           "=wall_density*wall_cp*wall_thickness", "J/(m²·K)", number_format="0")
    b.step("c_side_face", "Each face of the side walls (half their mass)", "=wall_c_area*side_area/2", "J/K",
           number_format="0")
    b.step("c_top_face", "Each face of the top (half its mass)", "=wall_c_area*top_area/2", "J/K", number_format="0")

    b.section("Tables", "Thermal network: branches (the sealed cabinet's; from = surface, to = fluid)")
    branches = branch_rows(
        height="=cab_height", side_area="=side_area", top_area="=top_area", top_length="=top_length",
        wall_thickness="=wall_thickness", wall_k="=wall_k", emissivity="=emissivity", method="=vplate_method")
    b.branch_table("Tables", branches, "day_branches")
    b.section("Tables", "Boundaries through the day (a value in words names a series below)")
    b.boundary_table("Tables", day_boundaries("=dissipation"), "day_bounds")
    b.section("Tables", "Boundaries of the steady comparison: peak sun and the maximum ambient together")
    b.boundary_table("Tables", [
        ["air_in", "Q", "=dissipation"], ["side_out", "Q", "=absorptance*sun_sides_peak*side_area"],
        ["top_out", "Q", "=absorptance*sun_top_peak*top_area"], ["ambient", "T", "=ambient_max"],
        ["sky", "T", "=ambient_max-sky_depression"]], "peak_bounds")
    b.section("Tables", "Heat capacities (node | C J/K; nodes not listed would be quasi-steady)")
    b.table("Tables", ["node", "C J/K"], capacity_rows(air="=c_air_node", side_face="=c_side_face",
                                                      top_face="=c_top_face"),
            name="day_capacities", formats=[None, "0"])
    b.section("Tables", "Series: sun absorbed (W) and surroundings (°C) at each hour, linear between hours")
    b.table("Tables", ["series", "time s", "value"], series_rows(), name="day_series", formats=[None, "0", "0.0"])
    b.section("Tables", "Output times (s): every 10 minutes through the day, read row by row")
    block = [OUTPUT_TIMES[k:k + TIMES_PER_ROW] for k in range(0, len(OUTPUT_TIMES), TIMES_PER_ROW)]
    b.table("Tables", [f"+{k * OUTPUT_STEP:g} s" for k in range(TIMES_PER_ROW)],
            [row + [None] * (TIMES_PER_ROW - len(row)) for row in block], name="day_times",
            formats=["0"] * TIMES_PER_ROW)

    day = "day_branches, day_bounds, day_capacities, day_times"
    tail = 'day_series, "periodic", "air", air_pressure'
    transient = f"NET_TRANSIENT({day}, {tail})"

    def extreme(node, which):
        return f'NET_PEAK({day}, "{node}", "{which}", {tail})'

    b.section("Tables", "The day every 30 minutes (chart data): rows of NET_TRANSIENT's table, °C")
    columns = ("air_in", "side_in", "top_in", "top_out", "ambient")
    first_row = b.sheet("Tables").row + 1             # the data start under the table's header
    rows = []
    for i, k in enumerate(range(0, len(OUTPUT_TIMES), CHART_EVERY)):
        at = xl_rowcol_to_cell(first_row + i, 1, col_abs=True)      # this row's "row" cell
        rows.append([OUTPUT_TIMES[k] / 3600.0, k + 2]
                    + [f"=INDEX({transient}, {at}, {NODES.index(n) + 2})" for n in columns])
    first, _, last, _ = b.table("Tables", ["hour", "row", "air in", "side in", "top in", "top out", "ambient"],
                                rows, formats=["0.0", "0"] + ["0.0"] * len(columns))

    b.section("Calculation", "Through the day (NET_TRANSIENT and NET_PEAK on the tables of sheet Tables)")
    b.step("t_air_peak", "Internal air, peak of the day", f"=INDEX({extreme('air_in', 'max')}, 1, 1)", "°C")
    b.step("t_air_peak_hour", "Time of the internal air peak", f"=INDEX({extreme('air_in', 'max')}, 1, 2)/3600",
           "h", number_format="0.00")
    b.step("t_side_in_min", "Side wall inner face, minimum of the day", f"=INDEX({extreme('side_in', 'min')}, 1, 1)",
           "°C")
    b.step("t_side_in_min_hour", "Time of the side wall minimum", f"=INDEX({extreme('side_in', 'min')}, 1, 2)/3600",
           "h", number_format="0.00")
    b.step("t_top_in_min", "Top inner face, minimum of the day", f"=INDEX({extreme('top_in', 'min')}, 1, 1)", "°C")
    b.step("t_top_in_min_hour", "Time of the top minimum", f"=INDEX({extreme('top_in', 'min')}, 1, 2)/3600", "h",
           number_format="0.00")
    b.step("t_coldest_inner", "Coldest inner wall of the day", "=MIN(t_side_in_min, t_top_in_min)", "°C")
    b.step("t_dew_sealed", "Dew point of the air sealed in (frost point below 0 °C)",
           "=DEW_POINT(seal_t, seal_rh, air_pressure)", "°C", "the vapour pressure sealed in, at any temperature")
    b.step("dew_clearance", "Coldest inner wall minus the dew point", "=t_coldest_inner-t_dew_sealed", "K")
    air_column = NODES.index("air_in") + 2
    b.step("cycle_gap", "Internal air at the end of the day minus at its start",
           f"=INDEX({transient}, {len(OUTPUT_TIMES) + 1}, {air_column})-INDEX({transient}, 2, {air_column})", "K",
           "within 0.001: the day repeats itself", number_format="0.0E+00")
    b.section("Calculation", "Steady comparison: peak sun and the maximum ambient held (NET_TEMP)")
    peak_pair, fluid = "day_branches, peak_bounds", '"air", air_pressure'
    b.step("t_air_steady", "Internal air, steady at peak sun and maximum ambient",
           f'=NET_TEMP({peak_pair}, "air_in", {fluid})', "°C")
    b.step("steady_excess", "Steady result minus the peak of the day", "=t_air_steady-t_air_peak", "K")
    b.step("t_air_steady_high", "Steady result, top of the correlation spread (NET_BAND)",
           f'=INDEX(NET_BAND({peak_pair}, "air_in", {fluid}), 1, 2)', "°C")

    # ------------------------------------------------------------------ Results
    b.section("Results", "Internal air through the day")
    b.result("res_t_air_peak", "Peak internal air temperature", "=t_air_peak", "°C")
    b.result("res_t_air_peak_hour", "Time of the peak (hours after midnight)", "=t_air_peak_hour", "h",
             number_format="0.00")
    b.result("res_limit", "Maximum allowed internal air temperature", "=max_internal_t", "°C")
    b.result("res_margin", "Margin to the limit (limit - peak)", "=max_internal_t-t_air_peak", "K")
    b.result("res_check", "Limit check (peak of the day)", limit_check("t_air_peak", "max_internal_t"), text=True,
             fails=("EXCEEDS LIMIT",))
    b.result("res_t_air_steady", "Steady result at peak sun and maximum ambient", "=t_air_steady", "°C",
             "what a steady calculation reports")
    b.result("res_steady_excess", "Steady result above the peak of the day", "=steady_excess", "K",
             "the cabinet's mass lags the sun and ambient")
    b.result("res_t_air_steady_high", "Steady result at the top of the correlation spread", "=t_air_steady_high",
             "°C", "the day itself is solved at the nominal correlations (see Notes)")
    b.section("Results", "Night")
    b.result("res_side_in_min", "Side walls, inner face: minimum", "=t_side_in_min", "°C")
    b.result("res_side_in_min_hour", "Time of that minimum", "=t_side_in_min_hour", "h", number_format="0.00")
    b.result("res_top_in_min", "Top, inner face: minimum", "=t_top_in_min", "°C")
    b.result("res_top_in_min_hour", "Time of that minimum", "=t_top_in_min_hour", "h", number_format="0.00")
    b.result("res_t_dew", "Dew point of the air sealed in", "=t_dew_sealed", "°C", "frost point below 0 °C")
    b.result("res_dew_clearance", "Coldest inner wall above the dew point", "=dew_clearance", "K")
    b.result("res_condensation", "Condensation check, through the day", condensation_check("t_coldest_inner"),
             text=True, fails=CONDENSATION_FAILS)
    b.section("Results", "Checks")
    b.result("res_cycle_gap", "Internal air, end of the day minus start", "=cycle_gap", "K",
             "within 0.001 K: the day repeats itself (see Notes)", number_format="0.0E+00")
    b.result("res_net_check", "Network check (steady comparison)", f"=NET_CHECK({peak_pair}, {fluid})", text=True)
    b.caution("Results", "Caution: mean internal air only - hot spots and components run hotter, and a hotter "
                         "day than the one entered is not covered. Check against the equipment and enclosure "
                         "makers' ratings, applicable standards and licensed practice (see Notes).")
    hours = "=" + b.column("Tables", first, last, 0)
    b.chart("Results", "line", "The cabinet through the day",
            [{"name": name, "categories": hours, "values": "=" + b.column("Tables", first, last, col)}
             for name, col in (("internal air", 2), ("side wall, inner face", 3), ("top, outer face", 5),
                               ("ambient air", 6))],
            "hour of the day", "temperature °C")

    # ------------------------------------------------------------------ Notes
    b.section("Notes", "Method")
    b.paragraph("The sealed cabinet's thermal network (internal air, inner and outer faces of the side walls "
                "and of the top, ambient air, sky; the branches of the sealed-cabinet template) is solved through "
                "one day by NET_TRANSIENT. Each node with a heat capacity C obeys C dT/dt = heat input + heat "
                "flowing in - heat flowing out; the capacities are the internal air with the equipment on the air "
                "node, and half of each wall's mass on each of its faces (table on sheet Tables). Every "
                "convection coefficient is re-evaluated at every instant from the film temperature and the "
                "correlation, as in the steady network. The integration is scipy's BDF method with the "
                "network's analytic Jacobian, local error 1e-5 K + 1e-6 |T| per step. The day is periodic: it "
                "is integrated again from its end until the end equals the start to 0.001 K, so the result "
                "is the day that repeats itself, not a day that remembers where it began.")
    b.paragraph("Sun: a clear day modelled as a half sine between sunrise and sunset scaled to the peak "
                "irradiances entered, on the top and (as a mean over the four faces) on the sides. This shape "
                "is common practice for a design day, not a published clear-sky model; take the peak "
                "irradiances from a solar resource source for the site and season. Ambient: a sine between the "
                "minimum and the maximum, highest at the hour entered (common practice). The series table holds "
                "both at every hour; NET_TRANSIENT reads them linearly between the hours (the half sine so read "
                "is within about 1 % of its peak).")
    b.paragraph("Steady comparison: the same network with peak sun and the maximum ambient held for ever, "
                "the usual steady design case. The difference shows what the cabinet's mass buys; it shrinks "
                "for a light cabinet and grows for a heavy one.")
    b.paragraph("Validity: at dawn and dusk a horizontal face's temperature difference to the air passes "
                "through zero, and the horizontal-plate correlations' Rayleigh number falls below their "
                "published range for a few minutes; stillair calc and the audit list those output times. The "
                "heat flowing there is small and the peak does not depend on it.")
    b.spread_note("steady result at peak sun")
    b.paragraph("The day itself is solved with each branch's nominal correlation; the spread is shown for the "
                "steady comparison only. The difference between the steady result and its top of the spread "
                "is a fair guide to how much the day's peak could move with the choice of correlation.")
    b.section("Notes", "Correlations used (sources from the stillair registry)")
    b.cite("Vertical faces, Churchill-Chu", "vplate", "churchill-chu")
    b.cite("Top, heated facing up and the underside cooled facing down, Lloyd-Moran", "hplate", "lloyd-moran")
    b.cite("Horizontal faces in the opposite case (e.g. the top at night, colder than the air), Raithby-Hollands",
           "hplate", "raithby-hollands")
    b.paragraph("Radiation: grey surface seeing large surroundings, q = eps sigma (T^4 - Tsurr^4); "
                "Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eq. 1.7 and 13.27 "
                "(small surface in a large enclosure).")
    b.section("Notes", "Assumptions and unverified values")
    b.paragraph("All internal dissipation is released to the internal air, constant through the day. The air "
                "and the equipment are one well-mixed node. The walls are thin: each face carries half of the "
                "wall's heat capacity. The floor is adiabatic (cabinet on a plinth). The sides see surroundings "
                "at the ambient air temperature, the top only the sky. No wind: still air gives the lowest "
                "convective cooling. The sky is a fixed amount colder than the air all day and night, a "
                "simplification: a clear night sky is usually further below the air than a sunny day's.")
    for constant in ("steel density 7850 kg/m³ and specific heat 460 J/(kg·K) (handbook values as recalled)",
                     "the equipment's heat capacity of 100 kJ/K (a rack of equipment with batteries, roughly "
                     "150 kg; an estimate)",
                     "the sky 12 K below the air all day (an estimate; a clear night sky is usually further "
                     "below)"):
        b.unverified(constant)
    b.paragraph("The defaults for the steel, the equipment's heat capacity and the sky are not from a source "
                "read for this template (listed as unverified below): replace them with the project's values.")
    b.section("Notes", "Cautions")
    b.paragraph("Overheating of electrical equipment: this template gives the mean internal air temperature "
                "only. It ignores internal airflow patterns, hot spots and component temperatures, which can be "
                "much higher than the mean air, and a day hotter or sunnier than the one entered. Defer to the "
                "equipment manufacturer's temperature ratings, the enclosure maker's thermal data and the "
                "applicable standards and licensed practice before relying on a result.", caution=True)
    b.paragraph("Condensation and mould: inner walls that fall below the dew point of the air inside wet the "
                "equipment. The check takes the dew point of the air as sealed in (its vapour content kept: no "
                "leaks, no breathing through glands, no drying agent); a cabinet that breathes takes up the "
                "outdoor moisture, and corners, fixings and cable glands run colder than the mean wall. Follow "
                "the enclosure maker's guidance and the applicable standards.", caution=True)


TEMPLATE = Template(NAME, 1, "Sealed outdoor cabinet through a day",
                    "Internal air and wall temperatures of a sealed outdoor cabinet through a clear day: "
                    "sun and ambient cycles, the cabinet's heat capacity, the peak against a steady result, the "
                    "night minimum of the inner walls against the dew point.", build)
