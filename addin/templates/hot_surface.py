"""Template: heat loss and surface temperature of a hot equipment face or pipe in still air or a wind.

The bare surface (temperature known) needs no iteration: its convection and radiation
coefficients follow directly from H_VPLATE / H_HPLATE / H_HCYL and H_RAD.  Each insulated case
of the thickness table is a small network - hot surface, insulation, outer surface, convection to
the air and radiation to the surroundings - and all of them are rows of one branch table (one
independent sub-network per thickness), solved together by the network solver.

A surface below the air temperature (a chilled-water pipe, a cold duct) is the cold mode: the
ambient humidity gives the dew point, and the insulation must keep the outer surface a chosen
margin above it (the condensation criterion of ISO 12241).  INSULATION_THICKNESS gives the exact
thickness for that surface temperature, and for the touch limit of a hot surface.
"""

from __future__ import annotations


from stillair.forced import MIXING_EQUATION, MIXING_SOURCE as _MIXING_SOURCE

from .book import limit_check, printed_source
from .spec import EMISSIVITY, FAILED, LIMIT_TEMPERATURE, SIG3, Template, Valid

MIXING_SOURCE = printed_source(_MIXING_SOURCE)  # as the Notes sheet prints it

NAME = "hot-surface"
# The unit of a heat flow per unit size: per metre of pipe or per square metre of face, by geometry.
PER_UNIT_LOSS = '=IF(kind="hcyl", "W/m", "W/m²")'
GEOMETRIES = ["horizontal cylinder", "vertical face", "horizontal top", "horizontal bottom"]
STEPS = 8  # insulated rows of the thickness table: 1..8 times the thickness step

SIZE = Valid(0.0, 10.0, "a size above 0 and at most 10 m (taller faces leave the correlations' Ra range)",
             low_open=True)
ROOM_AIR = Valid(-60.0, 60.0, "still air around equipment lies between about -60 and +60 °C (common practice)")


def outer_columns(kind, facing, wind, wind_length):
    """p3..p5 of an outer convection branch: the facing (hplate), the wind speed and a face's length
    along the wind, in the columns the kind has them (hcyl: wind in p3; vplate: wind, length in
    p3, p4; hplate: facing, wind, length in p3..p5).  Numbers for the tests."""
    return {"hcyl": (wind, None, None), "vplate": (wind, wind_length, None),
            "hplate": (facing, wind, wind_length)}[kind]


#: The same as cell formulas on the sheet's names, where the kind is chosen by a formula (a space
#: reads as blank in the network and shows a cached value in every viewer).
OUTER_COLUMN_FORMULAS = ('=IF(kind="hplate", facing, wind_speed)',
                         '=IF(kind="hplate", wind_speed, IF(kind="vplate", face_width, " "))',
                         '=IF(kind="hplate", face_width, " ")')


def insulated_branch_rows(rows):
    """Branch rows for the insulated cases.

    ``rows`` holds (resistance, kind, length, area, outer, emissivity) per thickness; ``outer``
    is the p3..p5 of the outer convection branch (:func:`outer_columns`, or
    :data:`OUTER_COLUMN_FORMULAS`).  Used by the template (cell formulas) and by the tests
    (numbers), so both build the same network.
    """
    table = []
    for k, (resistance, kind, length, area, outer, emissivity) in enumerate(rows, start=1):
        table.append([f"ins_{k}", "hot", f"surf_{k}", "resistance", resistance, None, None, None, None, None])
        table.append([f"conv_{k}", f"surf_{k}", "ambient", kind, length, area, *outer, None])
        table.append([f"rad_{k}", f"surf_{k}", "surroundings", "radiation", emissivity, None, area, None, None,
                      None])
    return table


def _convection_formula(surface_t: str, diameter: str) -> str:
    """The convection coefficient of the chosen geometry at ``surface_t`` (a pipe of ``diameter``)."""
    air = '"air", 101325, "auto", wind_speed'
    return (f'=IF(kind="hcyl", H_HCYL({surface_t}, ambient_t, {diameter}, {air}), IF(kind="vplate", '
            f'H_VPLATE({surface_t}, ambient_t, face_height, {air}, face_width), '
            f'H_HPLATE({surface_t}, ambient_t, bare_length, facing, {air}, face_width)))')


def _thickness_formula(surface_t: str) -> str:
    """INSULATION_THICKNESS of the chosen geometry for an outer surface at ``surface_t`` (0 where that is
    the bare surface's own temperature: no IF, whose unused branch a headless evaluation would
    still calculate)."""
    return (f'INSULATION_THICKNESS(hot_t, ambient_t, {surface_t}, ins_k, eps_jacket, kind, bare_length, '
            f'IF(kind="hplate", facing, ""), surroundings_t, "air", 101325, wind_speed, '
            f'IF(kind="hcyl", "", face_width))')


def boundary_rows(hot, ambient, surroundings):
    return [["hot", "T", hot], ["ambient", "T", ambient], ["surroundings", "T", surroundings]]


def build(b) -> None:
    # ------------------------------------------------------------------ Inputs
    b.section("Inputs", "Surface")
    b.input("geometry", "Geometry", "horizontal cylinder", "",
            "horizontal cylinder (pipe), vertical face, horizontal top, horizontal bottom",
            choices=GEOMETRIES)
    b.input("hot_t", "Hot surface temperature (bare metal)", 150.0, "°C",
            "taken as the temperature under the insulation too",
            valid=Valid(-60.0, 600.0, "the film temperature must stay inside the air property tables "
                        "(up to 800 °C)"))
    b.input("pipe_od", "Pipe outside diameter (cylinder)", 0.1143, "m", "used for the horizontal cylinder",
            valid=Valid(0.0, 3.0, "a diameter above 0 and at most 3 m (Churchill-Chu's Ra up to 1e12)",
                        low_open=True))
    b.input("pipe_length", "Pipe length (cylinder)", 10.0, "m", "used for the horizontal cylinder",
            valid=Valid(0.0, 10000.0, "a length above 0 (it scales the heat loss only)", low_open=True))
    b.input("face_height", "Face height (vertical) or depth (horizontal)", 1.0, "m", "used for the faces",
            valid=SIZE)
    b.input("face_width", "Face width", 1.5, "m", "used for the faces", valid=SIZE)
    b.input("eps_bare", "Emissivity of the bare surface", 0.8, "-", "oxidised steel about 0.8", valid=EMISSIVITY)
    b.section("Inputs", "Surroundings")
    b.input("ambient_t", "Air temperature", 20.0, "°C", valid=ROOM_AIR)
    b.input("wind_speed", "Wind or draught speed over the surface", 0.0, "m/s",
            "0: still air (see Notes)",
            valid=Valid(0.0, 30.0, "not negative; up to 30 m/s (a storm), inside the forced correlations' ranges "
                        "for these sizes"))
    b.input("surroundings_t", "Temperature of the surroundings (radiation)", 20.0, "°C",
            "walls and objects the surface sees", valid=ROOM_AIR)
    b.section("Inputs", "Insulation and touch limit")
    b.input("ins_k", "Insulation conductivity", 0.04, "W/(m·K)", "at its mean temperature (maker's data)",
            valid=Valid(0.01, 1.0, "thermal insulation conducts about 0.02 to 0.2 W/(m·K); 0.01 to 1 admits "
                        "any insulating material"))
    b.input("eps_jacket", "Emissivity of the jacket (outer surface)", 0.3, "-",
            "dull metal jackets low, painted or fabric jackets about 0.9", valid=EMISSIVITY)
    b.input("ins_step", "Thickness step of the table", 0.01, "m", f"the table runs 0, 1 x .. {STEPS} x this step",
            valid=Valid(0.0, 0.1, f"a step above 0 and at most 0.1 m ({STEPS} steps reach 0.8 m)", low_open=True))
    b.input("touch_limit", "Touch-temperature limit", 50.0, "°C",
            "set from ISO 13732-1 for the jacket material and contact time, or local rules",
            valid=LIMIT_TEMPERATURE)
    b.section("Inputs", "Cold surface: ambient humidity and condensation margin")
    b.input("ambient_rh", "Relative humidity of the air", 0.6, "-",
            "a fraction: 60 % is 0.6; used when the surface is colder than the air",
            valid=Valid(0.0, 1.0, "a relative humidity is a fraction above 0 and at most 1 (60 % is 0.6)",
                        low_open=True))
    b.input("dew_margin", "Margin wanted above the dew point", 1.0, "K",
            "a design choice: covers humidity peaks and jacket joints", valid=Valid(0.0, 30.0, "a margin in kelvin "
            "from 0 to 30"))

    # ------------------------------------------------------------------ Calculation
    b.section("Calculation", "Geometry")
    b.step("kind", "Network branch kind for the geometry",
           '=IF(geometry="horizontal cylinder", "hcyl", IF(geometry="vertical face", "vplate", '
           'IF(OR(geometry="horizontal top", geometry="horizontal bottom"), "hplate", '
           '"choose a geometry from the list")))', "", "hcyl, vplate or hplate")
    b.step("facing", "Facing of a horizontal face", '=IF(geometry="horizontal bottom", "down", "up")', "",
           "used by hplate only")
    b.step("bare_length", "Characteristic length of the bare surface",
           '=IF(kind="hcyl", pipe_od, IF(kind="vplate", face_height, '
           'face_height*face_width/(2*(face_height+face_width))))', "m",
           "diameter, height, or area/perimeter")
    b.step("bare_area", "Area of the bare surface",
           '=IF(kind="hcyl", PI()*pipe_od*pipe_length, face_height*face_width)', "m²")
    b.step("unit_size", "Unit of the 'per unit' results (pipe length or face area)",
           '=IF(kind="hcyl", pipe_length, bare_area)', '=IF(kind="hcyl", "m", "m²")', number_format="0.000")
    b.section("Calculation", "Bare surface (temperature known: no iteration)")
    b.step("h_conv_bare", "Convection coefficient, bare", _convection_formula("hot_t", "pipe_od"), "W/(m²·K)")
    b.step("h_rad_bare", "Radiation coefficient, bare", "=H_RAD(hot_t, surroundings_t, eps_bare)", "W/(m²·K)")
    b.step("q_conv_bare", "Convection loss, bare", "=h_conv_bare*bare_area*(hot_t-ambient_t)", "W")
    b.step("q_rad_bare", "Radiation loss, bare", "=h_rad_bare*bare_area*(hot_t-surroundings_t)", "W")
    b.step("q_bare", "Heat loss, bare", "=q_conv_bare+q_rad_bare", "W")
    b.step("ra_bare", "Rayleigh number, bare", "=RAYLEIGH(hot_t, ambient_t, bare_length)", "-",
           number_format="0.000E+00")
    b.step("pr_bare", "Prandtl number at the film temperature", "=AIR_PRANDTL((hot_t+ambient_t)/2)", "-")
    b.step("note_bare", "Validity of the bare-surface correlation",
           '=NU_NOTE(IF(kind="hcyl", "hcyl", IF(kind="vplate", "vplate", "hplate")), ra_bare, pr_bare, '
           'IF(kind="hplate", IF(facing="up", "hot-up", "hot-down"), ""))', "")

    b.section("Calculation", "Exact insulation thickness for a surface temperature (INSULATION_THICKNESS)")
    b.step("mode", "Surface against the air", '=IF(hot_t<ambient_t, "cold surface", "hot surface")', "")
    b.step("t_dew_ambient", "Dew point of the air (frost point below 0 °C)", "=DEW_POINT(ambient_t, ambient_rh)",
           "°C")
    b.step("t_dry_min", "Lowest outer surface temperature kept dry (dew point + margin)", "=t_dew_ambient+dew_margin",
           "°C")
    b.step("x_dry", "Insulation keeping the outer surface at dew point + margin",
           f"={_thickness_formula('MAX(hot_t, t_dry_min)')}", "m", "0 when the bare surface is warm enough")
    b.step("q_dry_unit", "Heat gain at that thickness, per m of pipe or per m² of face",
           "=IF(x_dry=0, -q_bare/unit_size, IF(kind=\"hcyl\", 2*PI()*ins_k*(t_dry_min-hot_t)/LN((pipe_od+2*x_dry)/"
           "pipe_od), ins_k*(t_dry_min-hot_t)/x_dry))", PER_UNIT_LOSS,
           "through the insulation; negative: a loss", number_format="0.0")
    b.step("x_touch", "Insulation keeping the outer surface at the touch limit",
           f"={_thickness_formula('MIN(hot_t, touch_limit)')}", "m", "0 when the bare surface is within the limit")

    sheet = "Tables"
    b.section(sheet, "Insulated cases: geometry of each thickness")
    geo_header = ["case", "thickness m", "outer size m", "area m²", "insulation R K/W", "facing (hplate only)"]
    start = b.sheets[sheet].row + 1  # first data row (0-based) of the geometry table
    geo_rows = []
    for k in range(1, STEPS + 1):
        r = start + k - 1
        t = b.cell(sheet, r, 2)
        size = b.cell(sheet, r, 3)
        geo_rows.append([
            f"{k} x step",
            f"={k}*ins_step",
            f'=IF(kind="hcyl", pipe_od+2*{t}, bare_length)',
            f'=IF(kind="hcyl", PI()*{size}*pipe_length, bare_area)',
            f'=IF(kind="hcyl", LN({size}/pipe_od)/(2*PI()*ins_k*pipe_length), {t}/(ins_k*bare_area))',
            # a space, not "": the network reads it as blank, and a viewer shows a cached value
            '=IF(kind="hplate", facing, " ")',
        ])
    first, _, last, _ = b.table(sheet, geo_header, geo_rows, col=1,
                                formats=[None, "0.000", "0.0000", "0.000", SIG3, None])
    assert first == start

    def geo(k, col):
        return "=" + b.cell(sheet, start + k - 1, col)

    b.blank(sheet)
    b.section(sheet, "Insulated cases: network branches (one sub-network per thickness)")
    b.branch_table(sheet, insulated_branch_rows(
        [(geo(k, 5), "=kind", geo(k, 3), geo(k, 4), OUTER_COLUMN_FORMULAS, "=eps_jacket")
         for k in range(1, STEPS + 1)]),
        "hs_branches")
    b.section(sheet, "Insulated cases: boundaries")
    b.boundary_table(sheet, boundary_rows("=hot_t", "=ambient_t", "=surroundings_t"), "hs_bounds")
    b.section("Calculation", "Insulated cases: a network per thickness (tables on the sheet Tables)")
    b.step("hs_check", "Network check", "=NET_CHECK(hs_branches, hs_bounds)", "")

    b.section(sheet, "Thickness table: outer surface temperature and heat loss")
    table_header = ["thickness mm", "surface °C", "heat loss W", "loss per unit", "touch limit °C",
                    "meets limit", "saving vs bare %", "above dew K"]
    tstart = b.sheets[sheet].row + 1

    def meets(row):  # a failed surface temperature must not read as "no" (or vanish from the search)
        return limit_check(b.cell(sheet, row, 2), "touch_limit", "yes", "no")

    rows = [["=0", "=hot_t", "=q_bare", "=q_bare/unit_size", "=touch_limit", meets(tstart), "=0",
             f"={b.cell(sheet, tstart, 2)}-t_dew_ambient"]]
    for k in range(1, STEPS + 1):
        r = tstart + k
        rows.append([f"=1000*{b.cell(sheet, start + k - 1, 2)}",
                     f'=NET_TEMP(hs_branches, hs_bounds, "surf_{k}")',
                     f'=NET_HEAT(hs_branches, hs_bounds, "ins_{k}")',
                     f"={b.cell(sheet, r, 3)}/unit_size",
                     "=touch_limit",
                     meets(r),
                     f"=100*(1-{b.cell(sheet, r, 3)}/q_bare)",
                     f"={b.cell(sheet, r, 2)}-t_dew_ambient"])
    tfirst, _, tlast, _ = b.table(sheet, table_header, rows, col=1,
                                  formats=["0", "0.0", "0.0", "0.0", "0.0", None, "0.0", "0.0"])
    assert tfirst == tstart
    b.verdicts(sheet, tfirst, 6, tlast, fails=("no",))

    def column(col):
        return b.column(sheet, tfirst, tlast, col)

    thickness_col, surface_col, loss_col, meets_col = column(1), column(2), column(3), column(6)

    def first_meeting(col):
        """The first row meeting the limit; a failed row fails the search rather than being skipped."""
        return (f'=IF(COUNTIF({meets_col}, "{FAILED}")>0, "{FAILED}", IF(COUNTIF({meets_col}, "yes")=0, '
                f'"none in the table", INDEX({col}, MATCH("yes", {meets_col}, 0))))')

    b.section("Calculation", "Thickness table (sheet Tables): the first thickness meeting the touch limit")
    b.step("first_ok_mm", "First thickness of the table meeting the touch limit", first_meeting(thickness_col),
           "mm")
    b.step("first_ok_t", "Outer surface temperature at that thickness", first_meeting(surface_col), "°C")
    b.step("first_ok_q", "Heat loss at that thickness", first_meeting(loss_col), "W")
    # one insulated case picked out by name, for checkers and the direction tests
    b.step("surf_t_first_step", "Outer surface temperature with 1 x step", "=" + b.cell(sheet, tstart + 1, 2), "°C")
    b.step("q_first_step", "Heat loss with 1 x step", "=" + b.cell(sheet, tstart + 1, 3), "W")
    b.step("surf_first_low", "Outer surface with 1 x step, all convection at the lowest covering Nu",
           '=INDEX(NET_BAND(hs_branches, hs_bounds, "surf_1"), 1, 1)', "°C", "correlation spread (NET_BAND)")
    b.step("surf_first_high", "Outer surface with 1 x step, all convection at the highest covering Nu",
           '=INDEX(NET_BAND(hs_branches, hs_bounds, "surf_1"), 1, 2)', "°C")
    b.step("h_conv_first_step", "Outer convection coefficient with 1 x step (check)",
           _convection_formula("surf_t_first_step", b.cell(sheet, start, 3)), "W/(m²·K)",
           "re-computed from the solved surface temperature")

    # ------------------------------------------------------------------ Results
    b.section("Results", "Bare surface")
    b.result("res_geometry", "Geometry", "=geometry", text=True)
    b.result("res_h_conv_bare", "Convection coefficient", "=h_conv_bare", "W/(m²·K)")
    b.result("res_h_rad_bare", "Radiation coefficient", "=h_rad_bare", "W/(m²·K)")
    b.result("res_q_bare", "Heat loss, bare", "=q_bare", "W")
    b.result("res_q_bare_unit", "Heat loss, bare, per m of pipe or per m² of face", "=q_bare/unit_size",
             PER_UNIT_LOSS, number_format="0.0")
    b.result("res_bare_check", "Bare surface against the touch limit",
             '=IF(hot_t<=touch_limit, "OK", "EXCEEDS LIMIT")', text=True, fails=("EXCEEDS LIMIT",))
    b.section("Results", "Insulation against the touch limit")
    b.result("res_touch_limit", "Touch-temperature limit", "=touch_limit", "°C")
    b.result("res_first_ok_mm", "First thickness in the table that meets it", "=first_ok_mm", "mm",
             number_format="0")
    b.result("res_first_ok_t", "Outer surface temperature at that thickness", "=first_ok_t", "°C")
    b.result("res_first_ok_q", "Heat loss at that thickness", "=first_ok_q", "W")
    b.result("res_surf_t_first_step", "Outer surface temperature with one thickness step", "=surf_t_first_step",
             "°C")
    b.result("res_surf_first_low", "Outer surface, one step, correlation spread: lowest", "=surf_first_low", "°C",
             "spread of the published correlations (see Notes)")
    b.result("res_surf_first_high", "Outer surface, one step, correlation spread: highest", "=surf_first_high",
             "°C")
    b.result("res_q_first_step", "Heat loss with one thickness step", "=q_first_step", "W")
    b.result("res_x_touch_mm", "Exact thickness for the touch limit", "=1000*x_touch", "mm",
             "0 when the bare surface is within it")
    b.section("Results", "Cold surface: condensation on the outer surface (ISO 12241 criterion)")
    b.result("res_mode", "Surface against the air", "=mode", text=True)
    b.result("res_dew_ambient", "Dew point of the air", "=t_dew_ambient", "°C", "frost point below 0 °C")
    b.result("res_t_dry_min", "Lowest outer surface temperature kept dry", "=t_dry_min", "°C",
             "dew point + the chosen margin")
    b.result("res_bare_dry", "Bare surface against the dew point",
             '=IF(hot_t<=t_dew_ambient, "CONDENSATION: bare surface "&TEXT(t_dew_ambient-hot_t, "0.0")&" K below '
             'the dew point", IF(hot_t<t_dry_min, "MARGIN SHORT: bare surface "&TEXT(hot_t-t_dew_ambient, "0.0")'
             '&" K above the dew point", "OK: bare surface "&TEXT(hot_t-t_dew_ambient, "0.0")&" K above the dew '
             'point"))', text=True, fails=("CONDENSATION", "MARGIN SHORT"))
    b.result("res_x_dry_mm", "Insulation thickness keeping the surface at dew point + margin", "=1000*x_dry", "mm",
             "0 when the bare surface is warm enough")
    b.result("res_q_dry_unit", "Heat gain at that thickness, per m of pipe or per m² of face", "=q_dry_unit",
             PER_UNIT_LOSS, "negative: a loss (a hot surface)", number_format="0.0")
    b.section("Results", "Validity")
    b.result("res_note_bare", "Bare-surface correlation", "=note_bare", text=True)
    b.result("res_net_check", "Insulated cases (network check)", "=hs_check", text=True)
    b.caution("Results", "Caution: touch temperatures can burn - the safe value depends on the material and the "
                         "contact time (ISO 13732-1). Follow local codes, makers' ratings and licensed practice "
                         "(see Notes).")
    b.caution("Results", "Caution: a cold surface that sweats wets the insulation, corrodes and drips. The margin "
                         "is a design choice; a vapour barrier is needed on cold insulation whatever its thickness "
                         "(see Notes).")
    x = f"={column(1)}"
    b.chart("Results", "scatter", "Outer surface temperature against insulation thickness",
            [{"name": "outer surface", "categories": x, "values": f"={column(2)}", "marker": {"type": "circle"}},
             {"name": "touch limit", "categories": x, "values": f"={column(5)}",
              "line": {"dash_type": "dash"}}],
            "insulation thickness mm", "temperature °C", subtype="straight_with_markers")
    b.chart("Results", "scatter", "Heat loss against insulation thickness",
            [{"name": "heat loss", "categories": x, "values": f"={column(3)}", "marker": {"type": "diamond"}}],
            "insulation thickness mm", "heat loss W", subtype="straight_with_markers")

    # ------------------------------------------------------------------ Notes
    b.section("Notes", "Method")
    b.paragraph("Bare surface: the surface temperature is known, so the convection coefficient follows "
                "directly from the correlation of the chosen geometry (H_HCYL, H_VPLATE or H_HPLATE, "
                "properties at the film temperature) and the radiation coefficient from H_RAD (grey surface "
                "in large surroundings). Heat loss = (h_conv + h_rad) x area x temperature difference.")
    b.paragraph("Insulated cases: each thickness is a network hot surface -> insulation -> outer surface -> "
                "(convection to the air, radiation to the surroundings). The insulation is a resistance: "
                "ln(D_out/D)/(2 pi k L) for a pipe, t/(k A) for a flat face. The outer surface temperature is "
                "unknown until the heat flow is known, so the network solver iterates it; every thickness is "
                "an independent sub-network in one branch table.")
    b.paragraph("Exact thickness: INSULATION_THICKNESS solves for the thickness at which the outer surface "
                "is at a given temperature - the touch limit of a hot surface, or the dew point plus the margin "
                "of a cold one. With the surface temperature given, the outer convection (the geometry's "
                "correlation at the insulated size) and radiation coefficients are known; a flat face then "
                "gives the thickness directly, x = k (t_surface - t_hot)/q, and a pipe gives one equation in "
                "the insulated diameter D, 2 k (t_hot - t_surface) = D ln(D/d) q(D), solved by a bracketing "
                "root-finder. The heat gain per unit is then the conduction through that insulation.")
    b.paragraph("Cold mode: when the surface is colder than the air, water vapour condenses on any part of the "
                "outer surface at or below the dew point of the air (DEW_POINT with the air's temperature and "
                "relative humidity; Hyland-Wexler saturation pressure, ASHRAE Handbook - Fundamentals 2017 ch. "
                "1; a frost point below 0 °C). ISO 12241 sizes insulation against condensation by keeping the "
                "outer surface temperature at or above that dew point (unverified, listed below); the margin on "
                "top is the designer's choice. The thickness table's last column shows each case's surface above "
                "the dew point.")
    b.unverified("ISO 12241's criterion against condensation: the outer surface at or above the dew point")
    b.spread_note("outer surface temperature with one thickness step")
    b.section("Notes", "Correlations used (sources from the stillair registry)")
    b.cite("Horizontal cylinder, Churchill-Chu", "hcyl", "churchill-chu")
    b.cite("Vertical face, Churchill-Chu", "vplate", "churchill-chu")
    b.cite("Horizontal top (hot, facing up), Lloyd-Moran", "hplate", "lloyd-moran")
    b.cite("Horizontal bottom (hot, facing down), Raithby-Hollands", "hplate", "raithby-hollands")
    b.paragraph("Radiation: grey surface seeing large surroundings, q = eps sigma (T^4 - Tsurr^4); "
                "Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eq. 1.7.")
    b.paragraph("Wind: with a wind speed above 0 the outer convection (bare, insulated and in the exact "
                "thickness) combines natural and forced convection as " + MIXING_EQUATION + " (source: "
                + MIXING_SOURCE + "); a pipe in cross-flow, a face with the wind along its width. Still air is "
                "the cautious case for the touch limit and for condensation on a cold surface (a wind brings "
                "the surface closer to the air); it is not for the heat loss, which a wind raises.")
    b.cite("Wind on a pipe, Churchill-Bernstein", "cylinder-crossflow", "churchill-bernstein")
    b.cite("Wind along a face, laminar boundary layer (up to Re 5e5)", "plate-flow", "pohlhausen")
    b.cite("Wind along a face, laminar then turbulent (above Re 5e5)", "plate-flow", "mixed-boundary-layer")
    b.section("Notes", "Assumptions")
    b.paragraph("The wind (or a draught; 0 by default: still air) is steady and horizontal, across a pipe and "
                "along a face's width. The metal under the insulation is at the hot surface "
                "temperature (the inside film and the metal wall are neglected). The insulation conductivity "
                "is one value (take it at the insulation's mean temperature from the maker's data). Flat faces "
                "keep their area when insulated (edge losses ignored); a pipe's outer diameter grows with the "
                "insulation. The surroundings are large compared with the surface. Steady state.")
    b.section("Notes", "Cautions")
    b.paragraph("Touch temperatures: whether a surface burns depends on its material and coating and on the "
                "contact time; ISO 13732-1 gives burn-threshold surface temperatures for these. The limit in "
                "this template is the user's choice. Follow local codes, the insulation and equipment "
                "manufacturers' ratings and licensed practice; guards or warning signs may be needed even "
                "where the calculated temperature meets the limit.", caution=True)
    b.paragraph("Cold surfaces: condensation wets and degrades insulation, corrodes pipes and supports and drips "
                "on what lies below. The dew point here is that of the stated air; humidity peaks, draughts of "
                "humid air and jacket joints raise the risk, which is what the margin is for, and it is a design "
                "choice. Cold insulation needs a continuous vapour barrier on its warm side whatever its "
                "thickness, or moisture diffuses in and condenses inside it. Follow the insulation makers' "
                "data, local codes and licensed practice.", caution=True)


TEMPLATE = Template(NAME, 7, "Hot or cold surface in still air or wind",
                    "Heat loss and surface temperature of a hot face or pipe in still air or a wind, bare and with "
                    "a table of insulation thicknesses against a touch-temperature limit; for a cold surface "
                    "the insulation thickness that keeps it above the ambient dew point, with the heat gain.",
                    build)
