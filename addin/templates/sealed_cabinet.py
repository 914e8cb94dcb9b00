"""Template: an outdoor sealed electrical or telecom cabinet.

Internal dissipation heats the internal air; the air gives it to the inner wall faces by natural
convection (vertical plates for the sides, a downward-facing plate for the underside of the top),
the walls conduct it, and the outer faces lose it by natural convection and radiation - the sides
to the ambient, the top to the sky.  Absorbed sun enters at the outer faces.  The network is
solved by the network cell functions; the Results sheet compares the internal air temperature with the user's
limit.
"""

from __future__ import annotations


from .book import limit_check
from .spec import EMISSIVITY, LIMIT_TEMPERATURE, OUTDOOR_AIR, SKY_TEMPERATURE, Template, Valid, altitude

NAME = "sealed-cabinet"
VPLATE_METHODS = ["auto", "churchill-chu", "churchill-chu-laminar", "mcadams"]


def branch_rows(*, height, side_area, top_area, top_length, wall_thickness, wall_k, emissivity, method):
    """The branch table, as cell formulas (names) or as numbers (tests pass numbers)."""
    return [
        ["conv_side_in", "side_in", "air_in", "vplate", height, side_area, None, None, None, method],
        ["conv_top_in", "top_in", "air_in", "hplate", top_length, top_area, "down", None, None, None],
        ["cond_side", "side_in", "side_out", "conduction", wall_thickness, wall_k, side_area, None, None, None],
        ["cond_top", "top_in", "top_out", "conduction", wall_thickness, wall_k, top_area, None, None, None],
        ["conv_side_out", "side_out", "ambient", "vplate", height, side_area, None, None, None, method],
        ["rad_side", "side_out", "ambient", "radiation", emissivity, None, side_area, None, None, None],
        ["conv_top_out", "top_out", "ambient", "hplate", top_length, top_area, "up", None, None, None],
        ["rad_top", "top_out", "sky", "radiation", emissivity, None, top_area, None, None, None],
    ]


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
SUN = Valid(0.0, 1400.0, "sun is a heat gain, not negative, and the solar constant (about 1361 W/m²) bounds it")


def build(b) -> None:
    # ------------------------------------------------------------------ Inputs
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
    b.input("dissipation", "Internal dissipation", 150.0, "W", "all equipment losses inside the cabinet",
            valid=Valid(0.0, 20000.0, "a dissipation is not negative; above 20 kW a sealed cabinet cannot lose it "
                        "by natural convection"))
    b.input("absorptance", "Solar absorptance of the outer finish", 0.3, "-", "light, clean finishes about 0.2-0.4",
            valid=Valid(0.0, 1.0, "an absorptance is a fraction of the incident sun, 0 to 1"))
    b.input("sun_top", "Solar irradiance on the top", 800.0, "W/m²", "0 for a shaded or night case", valid=SUN)
    b.input("sun_sides", "Solar irradiance on the sides (mean over all four)", 120.0, "W/m²",
            "0 for a shaded or night case", valid=SUN)
    b.section("Inputs", "Surroundings and limit")
    b.input("ambient_t", "Ambient air temperature", 30.0, "°C", "shade temperature at the site", valid=OUTDOOR_AIR)
    b.input("sky_t", "Sky temperature (seen by the top)", 15.0, "°C",
            "effective long-wave sky temperature, below the air temperature", valid=SKY_TEMPERATURE)
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
    b.section("Calculation", "Heat inputs")
    b.step("sun_top_w", "Absorbed sun on the top", "=absorptance*sun_top*top_area", "W")
    b.step("sun_sides_w", "Absorbed sun on the sides", "=absorptance*sun_sides*side_area", "W")
    b.step("heat_in", "Total heat input (dissipation + sun)", "=dissipation+sun_top_w+sun_sides_w", "W")

    # the network's tables live on the Tables sheet; the steps below pick from the solution
    b.section("Tables", "Thermal network: branches (from = surface, to = fluid for convection)")
    branches = branch_rows(
        height="=cab_height", side_area="=side_area", top_area="=top_area", top_length="=top_length",
        wall_thickness="=wall_thickness", wall_k="=wall_k", emissivity="=emissivity", method="=vplate_method")
    b.branch_table("Tables", branches, "cab_branches")
    b.section("Tables", "Thermal network: boundaries (T fixes °C, Q adds W)")
    b.boundary_table("Tables", boundary_rows(
        dissipation="=dissipation", sun_side="=sun_sides_w", sun_top="=sun_top_w",
        ambient="=ambient_t", sky="=sky_t"), "cab_bounds")
    b.section("Tables", "Thermal network: solution (one cell per entry; NET_SOLVE gives the same as one table)")
    pair, fluid = "cab_branches, cab_bounds", '"air", air_pressure'
    picks = b.network_solution("Tables", pair, fluid, branches)

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
    b.step("heat_out", "Total heat loss to ambient and sky",
           "=q_conv_sides+q_rad_sides+q_conv_top+q_rad_top", "W")
    b.step("balance", "Energy balance: heat input - heat loss", "=heat_in-heat_out", "W", "should be ~0",
           number_format="0.0E+00")
    b.section("Calculation", "Correlation spread of the internal air temperature (NET_BAND)")
    b.step("t_air_low", "Internal air, all convection at the lowest covering Nu",
           f'=INDEX(NET_BAND({pair}, "air_in", {fluid}), 1, 1)', "°C")
    b.step("t_air_high", "Internal air, all convection at the highest covering Nu",
           f'=INDEX(NET_BAND({pair}, "air_in", {fluid}), 1, 2)', "°C")
    b.section("Calculation", "Coefficients re-computed from the solved temperatures (for the checker)")
    b.step("h_in_sides", "Inside convection, side walls",
           '=H_VPLATE(t_side_in, t_air, cab_height, "air", air_pressure, vplate_method)', "W/(m²·K)")
    b.step("h_in_top", "Inside convection, underside of the top",
           '=H_HPLATE(t_top_in, t_air, top_length, "down", "air", air_pressure)', "W/(m²·K)")
    b.step("h_out_sides", "Outside convection, side walls",
           '=H_VPLATE(t_side_out, ambient_t, cab_height, "air", air_pressure, vplate_method)', "W/(m²·K)")
    b.step("h_out_top", "Outside convection, top",
           '=H_HPLATE(t_top_out, ambient_t, top_length, "up", "air", air_pressure)', "W/(m²·K)")
    b.step("h_rad_sides", "Radiation, side walls to ambient", "=H_RAD(t_side_out, ambient_t, emissivity)",
           "W/(m²·K)")
    b.step("h_rad_top", "Radiation, top to sky", "=H_RAD(t_top_out, sky_t, emissivity)", "W/(m²·K)")
    b.step("q_check_sides", "Check: sides lose (h + h_rad) A dT",
           "=h_out_sides*side_area*(t_side_out-ambient_t)+h_rad_sides*side_area*(t_side_out-ambient_t)", "W",
           "equals rows above: convection + radiation of the sides")

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
    b.result("res_limit", "Maximum allowed internal air temperature", "=max_internal_t", "°C")
    b.result("res_margin", "Margin to the limit (limit - internal air)", "=max_internal_t-t_air", "K")
    b.result("res_check", "Limit check", limit_check("t_air", "max_internal_t"), text=True, fails=("EXCEEDS LIMIT",))
    b.result("res_t_air_low", "Internal air, correlation spread: lowest", "=t_air_low", "°C",
             "spread of the published correlations (see Notes)")
    b.result("res_t_air_high", "Internal air, correlation spread: highest", "=t_air_high", "°C")
    b.result("res_check_high", "Limit check at the top of the spread",
             limit_check("t_air_high", "max_internal_t"), text=True, fails=("EXCEEDS LIMIT",))
    b.result("res_t_side_in", "Side wall, inner face", "=t_side_in", "°C")
    b.result("res_t_side_out", "Side wall, outer face", "=t_side_out", "°C")
    b.result("res_t_top_in", "Top, inner face", "=t_top_in", "°C")
    b.result("res_t_top_out", "Top, outer face", "=t_top_out", "°C")
    b.section("Results", "Heat balance")
    b.result("res_dissipation", "Internal dissipation", "=dissipation", "W")
    b.result("res_sun", "Absorbed sun (top + sides)", "=sun_top_w+sun_sides_w", "W")
    b.result("res_conv", "Convection to ambient (sides + top)", "=q_conv_sides+q_conv_top", "W")
    b.result("res_rad_ambient", "Radiation from the sides to ambient", "=q_rad_sides", "W")
    b.result("res_rad_sky", "Radiation from the top to the sky", "=q_rad_top", "W")
    b.result("res_balance", "Energy balance residual (input - loss)", "=balance", "W", number_format="0.0E+00")
    b.section("Results", "Validity")
    b.result("res_net_check", "Network check", f"=NET_CHECK({pair}, {fluid})", text=True)
    b.result("res_method_sides", "Correlation used, outer side walls", "=" + picks["method:conv_side_out"],
             text=True)
    b.result("res_method_top", "Correlation used, outer top", "=" + picks["method:conv_top_out"], text=True)
    b.caution("Results", "Caution: mean internal air only - hot spots and components run hotter. Check against "
                         "the equipment and enclosure makers' ratings, applicable standards and licensed practice "
                         "(see Notes).")
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
    b.section("Notes", "Assumptions")
    b.paragraph("All internal dissipation is released to the internal air, which is well mixed at one "
                "temperature; radiation from the equipment to the walls is ignored (this puts the air "
                "temperature on the high side). The floor is adiabatic (cabinet on a plinth). The walls are "
                "thin and isothermal over each face; the inner and outer areas are taken equal. The sides "
                "see surroundings at the ambient air temperature; the top sees only the sky. No wind: still "
                "air gives the lowest convective cooling. Sun on the sides is the mean over all four faces.")
    b.paragraph("Results are steady state; the cabinet's thermal mass and the daily cycle of sun and "
                "ambient are not modelled.")
    b.section("Notes", "Cautions")
    b.paragraph("Overheating of electrical equipment: this template gives the mean internal air "
                "temperature only. It ignores internal airflow patterns, hot spots and component "
                "temperatures, which can be much higher than the mean air. Defer to the equipment "
                "manufacturer's temperature ratings, the enclosure maker's thermal data and the applicable "
                "standards and licensed practice before relying on a result.", caution=True)


TEMPLATE = Template(NAME, 4, "Sealed outdoor cabinet",
                    "Internal air and wall temperatures of a sealed outdoor cabinet with internal "
                    "dissipation, sun, convection and radiation, against a temperature limit.", build)
