"""Template: an outdoor sealed electrical or telecom cabinet.

Internal dissipation heats the internal air; the air gives it to the inner wall faces by natural
convection (vertical plates for the sides, a downward-facing plate for the underside of the top),
the walls conduct it, and the outer faces lose it by natural convection and radiation - the sides
to the ambient, the top to the sky.  Absorbed sun enters at the outer faces.  The network is
solved by the network cell functions; the Results sheet compares the internal air temperature with the user's
limit, gives the dissipation the limit allows and the cooling needed beyond it (NET_HEAT_FOR), and
solves the same cabinet at night (no sun, cold sky, idle equipment) against the dew point of the
moisture sealed in, with the heater power that keeps the inner walls above it.

The pieces of the build (inputs, steps, tables, notes) are functions the vented cabinet
(vented_cabinet.py) calls as well, so the two workbooks share every row they have in common.
"""

from __future__ import annotations


from stillair.forced import MIXING_EQUATION, MIXING_SOURCE as _MIXING_SOURCE

from .book import limit_check, printed_source
from .spec import EMISSIVITY, LIMIT_TEMPERATURE, OUTDOOR_AIR, SKY_TEMPERATURE, Template, Valid, altitude

MIXING_SOURCE = printed_source(_MIXING_SOURCE)  # as the Notes sheet prints it

NAME = "sealed-cabinet"
VPLATE_METHODS = ["auto", "churchill-chu", "churchill-chu-laminar", "mcadams"]


def branch_rows(*, height, side_area, top_area, top_length, wall_thickness, wall_k, emissivity, method,
                wind=None, wind_length=None):
    """The branch table, as cell formulas (names) or as numbers (tests pass numbers).  The outer
    faces take the wind speed and their length along the wind (blank wind: still air)."""
    return [
        ["conv_side_in", "side_in", "air_in", "vplate", height, side_area, None, None, None, method],
        ["conv_top_in", "top_in", "air_in", "hplate", top_length, top_area, "down", None, None, None],
        ["cond_side", "side_in", "side_out", "conduction", wall_thickness, wall_k, side_area, None, None, None],
        ["cond_top", "top_in", "top_out", "conduction", wall_thickness, wall_k, top_area, None, None, None],
        ["conv_side_out", "side_out", "ambient", "vplate", height, side_area, wind, wind_length, None, method],
        ["rad_side", "side_out", "ambient", "radiation", emissivity, None, side_area, None, None, None],
        ["conv_top_out", "top_out", "ambient", "hplate", top_length, top_area, "up", wind, wind_length, None],
        ["rad_top", "top_out", "sky", "radiation", emissivity, None, top_area, None, None, None],
    ]


def night_boundary_rows(*, dissipation, ambient, sky):
    """The night case: no sun, the night ambient and sky, the equipment's night load."""
    return boundary_rows(dissipation=dissipation, sun_side=0.0, sun_top=0.0, ambient=ambient, sky=sky)


def boundary_rows(*, dissipation, sun_side, sun_top, ambient, sky):
    return [
        ["air_in", "Q", dissipation],
        ["side_out", "Q", sun_side],
        ["top_out", "Q", sun_top],
        ["ambient", "T", ambient],
        ["sky", "T", sky],
    ]


SIZE = Valid(0.0, 6.0, "above 0; faces taller than about 6 m leave the vertical-plate correlations' range "
             "(Ra up to 1e12)", low_open=True)
WIND = Valid(0.0, 30.0, "not negative; up to 30 m/s (a storm), inside the flat-plate correlations' range "
             "for a cabinet's faces (Re up to 1e8)")
SUN = Valid(0.0, 1400.0, "sun is a heat gain, not negative, and the solar constant (about 1361 W/m²) bounds it")
DISSIPATION = Valid(0.0, 20000.0, "a dissipation is not negative; above 20 kW a sealed cabinet cannot lose it by "
                    "natural convection")
#: The inner faces whose temperature is held above the dew point at night (node -> words).
INNER_WALLS = {"top_in": "top, inner face", "side_in": "side walls, inner face"}


def cabinet_inputs(b, dissipation: float = 150.0) -> None:
    """The inputs of the cabinet's walls and of the heat (sections "Cabinet" and "Heat")."""
    b.section("Inputs", "Cabinet")
    b.input("cab_height", "Cabinet height (outside)", 1.6, "m", "height of the vertical side walls", valid=SIZE)
    b.input("cab_width", "Cabinet width (outside)", 0.8, "m", valid=SIZE)
    b.input("cab_depth", "Cabinet depth (outside)", 0.6, "m", valid=SIZE)
    b.input("wall_thickness", "Wall thickness", 0.002, "m", "sheet steel or aluminium skin",
            valid=Valid(0.0, 0.1, "a skin above 0 and at most 0.1 m thick (thicker walls are not plane skins)",
                        low_open=True))
    b.input("wall_k", "Wall conductivity", 45.0, "W/(m·K)", "steel about 45-50, aluminium alloy about 150-200",
            valid=Valid(0.0, 500.0, "above 0; no wall material conducts more than about 500 W/(m·K)",
                        low_open=True))
    b.input("emissivity", "Outer surface emissivity", 0.9, "-", "painted surfaces about 0.9 (long-wave)",
            valid=EMISSIVITY)
    b.section("Inputs", "Heat")
    b.input("dissipation", "Internal dissipation", dissipation, "W", "all equipment losses inside the cabinet",
            valid=DISSIPATION)
    b.input("absorptance", "Solar absorptance of the outer finish", 0.3, "-", "light, clean finishes about 0.2-0.4",
            valid=Valid(0.0, 1.0, "an absorptance is a fraction of the incident sun, 0 to 1"))
    b.input("sun_top", "Solar irradiance on the top", 800.0, "W/m²", "0 for a shaded or night case", valid=SUN)
    b.input("sun_sides", "Solar irradiance on the sides", 120.0, "W/m²",
            "mean over all four; 0 when shaded or at night", valid=SUN)


def surroundings_inputs(b) -> None:
    """The inputs of the surroundings, the limit and the correlation choice."""
    b.section("Inputs", "Surroundings and limit")
    b.input("ambient_t", "Ambient air temperature", 30.0, "°C", "shade temperature at the site", valid=OUTDOOR_AIR)
    b.input("sky_t", "Sky temperature (seen by the top)", 15.0, "°C",
            "long-wave sky, below the air temperature", valid=SKY_TEMPERATURE)
    b.input("wind_speed", "Wind speed at the cabinet", 0.0, "m/s", "0: still air (cautious for overheating)",
            valid=WIND)
    b.input("altitude", "Site altitude", 0.0, "m", "sets the air pressure (standard atmosphere)", valid=altitude())
    b.input("max_internal_t", "Maximum allowed internal air temperature", 55.0, "°C",
            "from the equipment maker's rating", valid=LIMIT_TEMPERATURE)
    b.input("vplate_method", "Vertical-face correlation", "auto", "", "auto picks Churchill-Chu in its range",
            choices=VPLATE_METHODS)


def night_inputs(b) -> None:
    """The night case and the moisture sealed in (the sealed cabinet only)."""
    b.section("Inputs", "Night case and moisture sealed in")
    b.input("night_ambient_t", "Night ambient air temperature", 8.0, "°C", "the coldest night the cabinet must "
            "ride through", valid=OUTDOOR_AIR)
    b.input("night_sky_t", "Night sky temperature (seen by the top)", -8.0, "°C",
            "clear night: 15-25 K below air (common practice)", valid=SKY_TEMPERATURE)
    b.input("night_wind_speed", "Wind speed at night", 0.0, "m/s", "0: still air (see Notes)", valid=WIND)
    b.input("night_dissipation", "Internal dissipation at night", 40.0, "W",
            "equipment idling; 0 if it may be switched off", valid=DISSIPATION)
    moisture_inputs(b)


def moisture_inputs(b) -> None:
    """The air sealed in and the margin wanted above its dew point (also the cabinet-day template's)."""
    b.input("seal_t", "Air temperature when the cabinet was sealed", 20.0, "°C", "on site or in the factory",
            valid=OUTDOOR_AIR)
    b.input("seal_rh", "Relative humidity when the cabinet was sealed", 0.4, "-", "a fraction: 40 % is 0.4",
            valid=Valid(0.0, 1.0, "a relative humidity is a fraction above 0 and at most 1 (60 % is 0.6)",
                        low_open=True))
    b.input("dew_margin", "Margin wanted above the dew point", 3.0, "K",
            "design choice: corners and glands run colder",
            valid=Valid(0.0, 30.0, "a margin in kelvin from 0 to 30"))


def geometry_steps(b) -> None:
    """Areas, the top's length, the site's air pressure and the heat inputs."""
    b.section("Calculation", "Geometry and air pressure")
    b.step("side_area", "Area of the four side walls", "=2*(cab_width+cab_depth)*cab_height", "m²")
    b.step("top_area", "Area of the top", "=cab_width*cab_depth", "m²")
    b.step("top_length", "Characteristic length of the top (area/perimeter)",
           "=top_area/(2*(cab_width+cab_depth))", "m")
    b.step("air_pressure", "Air pressure at the site", "=ALTITUDE_PRESSURE(altitude)", "Pa")
    b.step("wind_length", "Length of the outer faces along the wind", "=MAX(cab_width, cab_depth)", "m",
           "the longer side: the lower forced coefficient (cautious)")
    b.section("Calculation", "Heat inputs")
    b.step("sun_top_w", "Absorbed sun on the top", "=absorptance*sun_top*top_area", "W")
    b.step("sun_sides_w", "Absorbed sun on the sides", "=absorptance*sun_sides*side_area", "W")
    b.step("heat_in", "Total heat input (dissipation + sun)", "=dissipation+sun_top_w+sun_sides_w", "W")


def network_branches(extra=(), wind="=wind_speed") -> list:
    """The branch table as formulas on the inputs' names, the outer faces in ``wind``, with
    ``extra`` rows after it."""
    return branch_rows(
        height="=cab_height", side_area="=side_area", top_area="=top_area", top_length="=top_length",
        wall_thickness="=wall_thickness", wall_k="=wall_k", emissivity="=emissivity",
        method="=vplate_method", wind=wind, wind_length="=wind_length") + list(extra)


def network_tables(b, extra=(), title="Thermal network: branches (from = surface, to = fluid for convection)"):
    """The Tables sheet: branches ("cab_branches", with ``extra`` rows), boundaries ("cab_bounds")
    and the solution.  Returns the tables argument, the fluid arguments and the solution's picks."""
    # the network's tables live on the Tables sheet; the steps below pick from the solution
    b.section("Tables", title)
    branches = network_branches(extra)
    b.branch_table("Tables", branches, "cab_branches")
    b.section("Tables", "Thermal network: boundaries (T fixes °C, Q adds W)")
    b.boundary_table("Tables", boundary_rows(
        dissipation="=dissipation", sun_side="=sun_sides_w", sun_top="=sun_top_w",
        ambient="=ambient_t", sky="=sky_t"), "cab_bounds")
    b.section("Tables", "Thermal network: solution (one cell per entry; NET_SOLVE gives the same as one table)")
    pair, fluid = "cab_branches, cab_bounds", '"air", air_pressure'
    return pair, fluid, b.network_solution("Tables", pair, fluid, branches)


def solution_steps(b, pair: str, fluid: str) -> None:
    """The face temperatures and the walls' heat flows picked from the solved network."""
    b.section("Calculation", "Temperatures and heat flows picked from the solved network (sheet Tables)")
    b.step("t_air", "Internal air temperature", f'=NET_TEMP({pair}, "air_in", {fluid})', "°C")
    b.step("t_side_in", "Side wall, inner face", f'=NET_TEMP({pair}, "side_in", {fluid})', "°C")
    b.step("t_side_out", "Side wall, outer face", f'=NET_TEMP({pair}, "side_out", {fluid})', "°C")
    b.step("t_top_in", "Top, inner face (underside)", f'=NET_TEMP({pair}, "top_in", {fluid})', "°C")
    b.step("t_top_out", "Top, outer face", f'=NET_TEMP({pair}, "top_out", {fluid})', "°C")
    b.step("q_conv_sides", "Convection from the sides to ambient", f'=NET_HEAT({pair}, "conv_side_out", {fluid})', "W")
    b.step("q_rad_sides", "Radiation from the sides to ambient", f'=NET_HEAT({pair}, "rad_side", {fluid})', "W")
    b.step("q_conv_top", "Convection from the top to ambient", f'=NET_HEAT({pair}, "conv_top_out", {fluid})', "W")
    b.step("q_rad_top", "Radiation from the top to the sky", f'=NET_HEAT({pair}, "rad_top", {fluid})', "W")


def band_steps(b, pair: str, fluid: str) -> None:
    """The internal air at the lowest and highest covering Nu of every convection branch."""
    b.section("Calculation", "Correlation spread of the internal air temperature (NET_BAND)")
    b.step("t_air_low", "Internal air, all convection at the lowest covering Nu",
           f'=INDEX(NET_BAND({pair}, "air_in", {fluid}), 1, 1)', "°C")
    b.step("t_air_high", "Internal air, all convection at the highest covering Nu",
           f'=INDEX(NET_BAND({pair}, "air_in", {fluid}), 1, 2)', "°C")


def turned_round_steps(b, pair: str, fluid: str) -> str:
    """The allowed dissipation and cooling (NET_HEAT_FOR), and the night case against the dew point
    of the moisture sealed in, with the heater power.  Returns the night case's tables argument."""
    b.section("Calculation", "The limit turned round: heat for the limit temperature (NET_HEAT_FOR)")
    b.step("allowed_q", "Internal dissipation at which the internal air reaches the limit",
           f'=NET_HEAT_FOR({pair}, "air_in", max_internal_t, {fluid})', "W",
           "the network re-solved with this sun; negative: the sun alone exceeds the limit")
    b.step("cooling_q", "Cooling power needed to hold the limit", "=MAX(0, dissipation-allowed_q)", "W",
           "heat to remove from the internal air; 0 within the limit")
    b.section("Tables", "Night case: boundaries (no sun, night ambient and sky, night load)")
    b.boundary_table("Tables", night_boundary_rows(dissipation="=night_dissipation", ambient="=night_ambient_t",
                                                   sky="=night_sky_t"), "cab_bounds_night")
    b.section("Tables", "Night case: branches (the same cabinet in the night wind)")
    b.branch_table("Tables", network_branches(wind="=night_wind_speed"), "cab_branches_night")
    night = "cab_branches_night, cab_bounds_night"
    b.section("Calculation", "Night case: the same cabinet, no sun, cold sky, the night wind (sheet Tables)")
    b.step("t_air_night", "Internal air at night", f'=NET_TEMP({night}, "air_in", {fluid})', "°C")
    for node, words in INNER_WALLS.items():
        b.step(f"t_{node}_night", f"{words[0].upper()}{words[1:]} at night", f'=NET_TEMP({night}, "{node}", {fluid})',
               "°C")
    b.step("t_coldest_night", "Coldest inner wall at night",
           "=MIN(" + ", ".join(f"t_{node}_night" for node in INNER_WALLS) + ")", "°C")
    b.step("w_sealed", "Humidity ratio of the air sealed in", "=HUMIDITY_RATIO(seal_t, seal_rh, air_pressure)",
           "kg/kg", "kept while no water condenses or enters", number_format="0.00000")
    b.step("t_dew_sealed", "Dew point of the air sealed in (frost point below 0 °C)",
           "=DEW_POINT(seal_t, seal_rh, air_pressure)", "°C", "the vapour pressure sealed in, at any temperature")
    b.step("rh_air_night", "Relative humidity of the internal air at night",
           "=SURFACE_RH(seal_t, seal_rh, t_air_night, air_pressure)", "-", "above 1: the air itself is saturated")
    b.step("dew_clearance", "Coldest inner wall minus the dew point", "=t_coldest_night-t_dew_sealed", "K")
    b.step("wall_target", "Inner walls held at (dew point + margin)", "=t_dew_sealed+dew_margin", "°C")
    for node, words in INNER_WALLS.items():
        b.step(f"q_hold_{node}", f"Internal heat holding the {words} at the target",
               f'=NET_HEAT_FOR({night}, "air_in", wall_target, {fluid}, "{node}")', "W",
               "NET_HEAT_FOR at the internal air, target at this wall")
    b.step("heater_q", "Heater power in the internal air (beyond the night load)",
           "=MAX(0, MAX(" + ", ".join(f"q_hold_{node}" for node in INNER_WALLS) + ")-night_dissipation)", "W",
           "0 when the night load alone keeps every inner wall at the target")
    return night


CONDENSATION_FAILS = ("CONDENSATION", "MARGIN SHORT")


def condensation_check(coldest: str) -> str:
    """The verdict formula: the coldest inner wall (the name of its cell) against the dew point of
    the air sealed in (t_dew_sealed), with the clearance (dew_clearance) and the margin wanted
    (dew_margin) as named cells; the cabinet-day template reads it too."""
    return (f'=IF(NOT(AND(ISNUMBER({coldest}), ISNUMBER(t_dew_sealed))), "CALC FAILED", '
            'IF(dew_clearance<=0, "CONDENSATION: coldest inner wall "&TEXT(-dew_clearance, "0.0")&" K below the '
            'dew point", IF(dew_clearance<dew_margin, "MARGIN SHORT: coldest inner wall "&TEXT(dew_clearance, '
            '"0.0")&" K above the dew point, "&TEXT(dew_margin, "0.0")&" K wanted", "OK: coldest inner wall "'
            '&TEXT(dew_clearance, "0.0")&" K above the dew point")))')


def turned_round_results(b) -> None:
    """Allowed dissipation, cooling, and the night case's condensation check and heater."""
    b.section("Results", "Allowed dissipation and cooling")
    b.result("res_allowed_q", "Internal dissipation allowed by the limit (with this sun)", "=allowed_q", "W",
             "the whole network re-solved at the limit")
    b.result("res_cooling_q", "Cooling power needed to hold the limit", "=cooling_q", "W",
             "for choosing a heat exchanger or cooler; 0 within the limit")
    b.section("Results", "Night case: condensation inside")
    b.result("res_t_air_night", "Internal air at night", "=t_air_night", "°C", "no sun, night sky, the night wind")
    b.result("res_t_coldest_night", "Coldest inner wall at night", "=t_coldest_night", "°C")
    b.result("res_t_dew", "Dew point of the air sealed in", "=t_dew_sealed", "°C",
             "frost point below 0 °C")
    b.result("res_dew_clearance", "Coldest inner wall above the dew point", "=dew_clearance", "K")
    b.result("res_condensation", "Condensation check, night", condensation_check("t_coldest_night"), text=True,
             fails=CONDENSATION_FAILS)
    b.result("res_heater_q", "Heater power keeping the inner walls at dew point + margin", "=heater_q", "W",
             "in the internal air, beyond the night load")
    b.result("res_rh_air_night", "Relative humidity of the internal air at night", "=rh_air_night", "-")


def turned_round_notes(b) -> None:
    b.section("Notes", "The limit turned round, and the night case")
    b.paragraph("Allowed dissipation: NET_HEAT_FOR finds the heat input at the internal air at which the whole "
                "network - film properties, correlations and radiation re-evaluated at every trial - puts the "
                "internal air at the limit, with the same sun, ambient and sky (a bracketing root-finder around "
                "the network solver; it returns only a converged answer, within 1e-6 K of the limit). The cooling "
                "power is the dissipation minus that allowance: the heat a heat exchanger or cooler must take "
                "from the internal air to hold the limit (choose the unit with its makers' margin on top).")
    b.paragraph("Night case: the same network with no sun, the night ambient air, the night sky seen by the top "
                "and the equipment's night load, in the night wind. With little internal heat a wind ties the walls "
                "closer to the air, which is warmer than the clear sky, so still air is the cautious case for the "
                "condensation check; but a wind takes more heat from the walls, so the heater power that holds "
                "them at the target grows with it: size the heater for the windiest night you expect.")
    b.paragraph("Moisture sealed in: the air closed in at the sealing temperature and relative humidity keeps "
                "its humidity ratio and, at constant total pressure, its vapour pressure, so its dew point "
                "(DEW_POINT, Hyland-Wexler saturation, ASHRAE Handbook - Fundamentals 2017 ch. 1; a frost point "
                "below 0 °C) is the same at night. A rigid box that does not breathe would lower its vapour "
                "pressure a little as it cools (constant volume), so constant pressure is the cautious "
                "assumption. Moisture entering through seals, glands and breathers over time, and water "
                "given off by materials or a desiccant taking it up, are not modelled.")
    b.paragraph("Condensation check: the coldest inner wall (the mean temperature of each inner face; the top, "
                "seeing the sky, is usually the coldest) against the dew point of the air sealed in: "
                "condensation at or below it, a short margin above it by less than the chosen margin, OK beyond. "
                "Heater: a heater in the internal air (a convective anti-condensation heater); NET_HEAT_FOR "
                "finds the internal heat at which each inner face is at dew point + margin, the larger of the "
                "two holds both, and the heater supplies what the night load does not.")


def coefficient_steps(b) -> None:
    """The coefficients re-computed from the solved temperatures, for the checker."""
    b.section("Calculation", "Coefficients re-computed from the solved temperatures (for the checker)")
    b.step("h_in_sides", "Inside convection, side walls",
           '=H_VPLATE(t_side_in, t_air, cab_height, "air", air_pressure, vplate_method)', "W/(m²·K)")
    b.step("h_in_top", "Inside convection, underside of the top",
           '=H_HPLATE(t_top_in, t_air, top_length, "down", "air", air_pressure)', "W/(m²·K)")
    b.step("h_out_sides", "Outside convection, side walls",
           '=H_VPLATE(t_side_out, ambient_t, cab_height, "air", air_pressure, vplate_method, wind_speed, wind_length)',
           "W/(m²·K)", "natural and wind combined: (h_N³ + h_F³)^(1/3)")
    b.step("h_out_top", "Outside convection, top",
           '=H_HPLATE(t_top_out, ambient_t, top_length, "up", "air", air_pressure, "auto", wind_speed, wind_length)',
           "W/(m²·K)")
    b.step("h_rad_sides", "Radiation, side walls to ambient", "=H_RAD(t_side_out, ambient_t, emissivity)",
           "W/(m²·K)")
    b.step("h_rad_top", "Radiation, top to sky", "=H_RAD(t_top_out, sky_t, emissivity)", "W/(m²·K)")
    b.step("q_check_sides", "Check: sides lose (h + h_rad) A dT",
           "=h_out_sides*side_area*(t_side_out-ambient_t)+h_rad_sides*side_area*(t_side_out-ambient_t)", "W",
           "equals rows above: convection + radiation of the sides")


def limit_results(b) -> None:
    """The internal air against the limit, with the correlation spread and its limit check."""
    b.result("res_limit", "Maximum allowed internal air temperature", "=max_internal_t", "°C")
    b.result("res_margin", "Margin to the limit (limit - internal air)", "=max_internal_t-t_air", "K")
    b.result("res_check", "Limit check", limit_check("t_air", "max_internal_t"), text=True, fails=("EXCEEDS LIMIT",))
    b.result("res_t_air_low", "Internal air, correlation spread: lowest", "=t_air_low", "°C",
             "spread of the published correlations (see Notes)")
    b.result("res_t_air_high", "Internal air, correlation spread: highest", "=t_air_high", "°C")
    b.result("res_check_high", "Limit check at the top of the spread",
             limit_check("t_air_high", "max_internal_t"), text=True, fails=("EXCEEDS LIMIT",))


def validity_results(b, pair: str, fluid: str, picks: dict) -> None:
    """The network check and the correlations the outer faces used."""
    b.section("Results", "Validity")
    b.result("res_net_check", "Network check", f"=NET_CHECK({pair}, {fluid})", text=True)
    b.result("res_method_sides", "Correlation used, outer side walls", "=" + picks["method:conv_side_out"],
             text=True)
    b.result("res_method_top", "Correlation used, outer top", "=" + picks["method:conv_top_out"], text=True)


def correlation_notes(b) -> None:
    """The Notes section citing the walls' correlations and the radiation law."""
    b.section("Notes", "Correlations used (sources from the stillair registry)")
    b.cite("Vertical faces, Churchill-Chu", "vplate", "churchill-chu")
    b.cite("Vertical faces, Churchill-Chu laminar form (selectable)", "vplate", "churchill-chu-laminar")
    b.cite("Vertical faces, McAdams (selectable)", "vplate", "mcadams")
    b.cite("Top, outer face heated facing up and inner face cooled facing down, Lloyd-Moran",
           "hplate", "lloyd-moran")
    b.cite("Horizontal faces in the opposite case (e.g. a top cooler than the air around it), Raithby-Hollands",
           "hplate", "raithby-hollands")
    b.paragraph("Radiation: grey surface seeing large surroundings, q = eps sigma (T^4 - Tsurr^4); "
                "Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eq. 1.7 and 13.27 "
                "(small surface in a large enclosure).")
    b.paragraph("Wind: the outer faces (sides and top) take the wind speed. Natural convection and forced "
                "convection over a flat plate are combined as " + MIXING_EQUATION + ", the wind horizontal and "
                "along the faces, their length along the wind the longer side of the cabinet (the lower forced "
                "coefficient, cautious for overheating). Source of the combination: " + MIXING_SOURCE + ". Wind 0 "
                "is still air exactly, the cautious case for overheating; a real site is gusty and sheltered in "
                "turn, so count only on a wind you can rely on.")
    b.cite("Wind, forced part, laminar boundary layer (up to Re 5e5)", "plate-flow", "pohlhausen")
    b.cite("Wind, forced part, laminar then turbulent boundary layer (above Re 5e5)", "plate-flow",
           "mixed-boundary-layer")


def build(b) -> None:
    # ------------------------------------------------------------------ Inputs
    cabinet_inputs(b)
    surroundings_inputs(b)
    night_inputs(b)

    # ------------------------------------------------------------------ Calculation
    geometry_steps(b)
    pair, fluid, picks = network_tables(b)
    solution_steps(b, pair, fluid)
    b.step("heat_out", "Total heat loss to ambient and sky",
           "=q_conv_sides+q_rad_sides+q_conv_top+q_rad_top", "W")
    b.step("balance", "Energy balance: heat input - heat loss", "=heat_in-heat_out", "W", "should be ~0",
           number_format="0.0E+00")
    band_steps(b, pair, fluid)
    night = turned_round_steps(b, pair, fluid)
    coefficient_steps(b)

    b.blank("Calculation")
    b.section("Calculation", "Temperature profile (chart data)")
    profile_first, _, profile_last, _ = b.table(
        "Calculation", ["position", "through a side wall °C", "through the top °C"],
        [["internal air", "=t_air", "=t_air"],
         ["inner face", "=t_side_in", "=t_top_in"],
         ["outer face", "=t_side_out", "=t_top_out"],
         ["surroundings (ambient / sky)", "=ambient_t", "=sky_t"]], col=1, formats=[None, "0.0", "0.0"])

    # ------------------------------------------------------------------ Results
    b.section("Results", "Cabinet temperatures")
    b.result("res_t_air", "Internal air temperature", "=t_air", "°C")
    limit_results(b)
    b.result("res_t_side_in", "Side wall, inner face", "=t_side_in", "°C")
    b.result("res_t_side_out", "Side wall, outer face", "=t_side_out", "°C")
    b.result("res_t_top_in", "Top, inner face", "=t_top_in", "°C")
    b.result("res_t_top_out", "Top, outer face", "=t_top_out", "°C")
    turned_round_results(b)
    b.section("Results", "Heat balance")
    b.result("res_dissipation", "Internal dissipation", "=dissipation", "W")
    b.result("res_sun", "Absorbed sun (top + sides)", "=sun_top_w+sun_sides_w", "W")
    b.result("res_conv", "Convection to ambient (sides + top)", "=q_conv_sides+q_conv_top", "W")
    b.result("res_rad_ambient", "Radiation from the sides to ambient", "=q_rad_sides", "W")
    b.result("res_rad_sky", "Radiation from the top to the sky", "=q_rad_top", "W")
    b.result("res_balance", "Energy balance residual (input - loss)", "=balance", "W", number_format="0.0E+00")
    validity_results(b, pair, fluid, picks)
    b.result("res_net_check_night", "Network check, night case", f"=NET_CHECK({night}, {fluid})", text=True)
    b.caution("Results", "Caution: mean internal air only - hot spots and components run hotter. Check against "
                         "the equipment and enclosure makers' ratings, applicable standards and licensed practice "
                         "(see Notes).")
    b.caution("Results", "Caution: condensation inside an enclosure damages equipment. The dew-point margin is a "
                         "design choice; follow the equipment makers' ratings and local practice (see Notes).")
    b.chart("Results", "line", "Temperature through the walls",
            [{"name": "through a side wall",
              "categories": "=" + b.column("Calculation", profile_first, profile_last, 1),
              "values": "=" + b.column("Calculation", profile_first, profile_last, 2),
              "marker": {"type": "circle"}},
             {"name": "through the top",
              "categories": "=" + b.column("Calculation", profile_first, profile_last, 1),
              "values": "=" + b.column("Calculation", profile_first, profile_last, 3),
              "marker": {"type": "square"}}],
            "", "temperature °C")

    # ------------------------------------------------------------------ Notes
    b.section("Notes", "Method")
    b.paragraph("The cabinet is a thermal network of seven nodes: the internal air (receiving the "
                "internal dissipation), the inner and outer faces of the side walls and of the top, the "
                "ambient air and the sky. Internal air to inner faces: natural convection (vertical plates "
                "for the sides, a downward-facing horizontal plate for the underside of the top). Walls: "
                "plane conduction. Outer faces: natural convection to the ambient air, radiation from the "
                "sides to the ambient and from the top to the sky. Absorbed sun (absorptance x irradiance x "
                "area) enters as a heat input at the outer faces.")
    b.paragraph("NET_SOLVE closes every node's energy balance by Newton iteration; each convection branch "
                "takes its gas properties at its own film temperature and its correlation at its own "
                "temperature difference, and a horizontal face is treated as hot or cold from the sign of "
                "that difference, so no coefficient is guessed. The Calculation sheet re-computes the "
                "coefficients with H_VPLATE, H_HPLATE and H_RAD from the solved temperatures so a checker "
                "can follow each one.")
    b.spread_note("internal air temperature")
    turned_round_notes(b)
    correlation_notes(b)
    b.section("Notes", "Assumptions")
    b.paragraph("All internal dissipation is released to the internal air, which is well mixed at one "
                "temperature; radiation from the equipment to the walls is ignored (this puts the air "
                "temperature on the high side). The floor is adiabatic (cabinet on a plinth). The walls are "
                "thin and isothermal over each face; the inner and outer areas are taken equal. The sides "
                "see surroundings at the ambient air temperature; the top sees only the sky. The wind (0 by "
                "default: still air gives the lowest convective cooling) is steady and horizontal. Sun on the sides is the mean over all four faces.")
    b.paragraph("Results are steady state; the cabinet's thermal mass and the daily cycle of sun and "
                "ambient are not modelled.")
    b.section("Notes", "Cautions")
    b.paragraph("Overheating of electrical equipment: this template gives the mean internal air "
                "temperature only. It ignores internal airflow patterns, hot spots and component "
                "temperatures, which can be much higher than the mean air. Defer to the equipment "
                "manufacturer's temperature ratings, the enclosure maker's thermal data and the applicable "
                "standards and licensed practice before relying on a result.", caution=True)
    b.paragraph("Condensation inside enclosures corrodes contacts and boards and can cause tracking and short "
                "circuits. The night case gives mean face temperatures only; corners, fixings, cable glands and "
                "thermal bridges are colder. The dew-point margin is a design choice. Follow the equipment "
                "makers' ratings for humidity and condensation, the enclosure maker's guidance on heaters and "
                "breathers, local practice and licensed advice.", caution=True)


TEMPLATE = Template(NAME, 7, "Sealed outdoor cabinet",
                    "Internal air and wall temperatures of a sealed outdoor cabinet with internal "
                    "dissipation, sun, convection and radiation, against a temperature limit; the "
                    "dissipation the limit allows, the cooling needed beyond it, and the night case "
                    "against the dew point of the moisture sealed in, with the heater power.", build)
