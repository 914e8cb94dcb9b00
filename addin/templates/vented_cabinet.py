"""Template: an outdoor electrical or telecom cabinet with ventilation openings.

The sealed cabinet's network (internal air, inner and outer faces of the sides and the top,
ambient and sky; sealed_cabinet.branch_rows) with one more branch: a low and a high opening
through which the stack effect draws outside air.  The air carries heat m cp (T_air - T_ambient)
out of the cabinet beside what the walls lose.  The Results sheet shows the internal air against
the limit, the airflow, the heat carried by the air against that through the walls, the same
cabinet sealed, and the fan airflow that would hold the limit instead.
"""

from __future__ import annotations

from stillair.constants import STANDARD_GRAVITY

from .spec import Template, Valid
from . import sealed_cabinet as sealed

NAME = "vented-cabinet"
DISSIPATION = 400.0   # W, the default scenario: more than the sealed cabinet's 150 W
NO_FAN = "NOT POSSIBLE: limit at or below the ambient"

AREA = Valid(0.0, 1.0, "an opening's area is above 0; a cabinet opening above 1 m² is a missing wall, not a "
             "vent", low_open=True)


def vent_row(*, inlet_area, outlet_area, height, discharge, extra_loss):
    """The vent branch: from the internal air to the ambient air."""
    return ["vent", "air_in", "ambient", "vent", inlet_area, outlet_area, height, discharge, extra_loss, None]


def build(b) -> None:
    # the loss coefficients printed in Notes come from the `fluids` library, read
    # only when the workbook is built
    from fluids.filters import square_edge_grill, square_edge_screen

    # ------------------------------------------------------------------ Inputs
    sealed.cabinet_inputs(b, dissipation=DISSIPATION)
    b.section("Inputs", "Ventilation openings")
    b.input("inlet_area", "Area of the low opening(s), all together", 0.02, "m²",
            "as cut in the wall, below the equipment", valid=AREA)
    b.input("outlet_area", "Area of the high opening(s), all together", 0.02, "m²",
            "as cut in the wall, near the top", valid=AREA)
    b.input("vent_height", "Height between the openings' centres", 1.3, "m", "at most the cabinet height",
            valid=Valid(0.0, 6.0, "above 0 and within the cabinet", low_open=True,
                        extra=("{cell}<=cab_height",), extra_words="and at most the cabinet height"))
    b.input("discharge", "Discharge coefficient of the openings", 0.61, "-",
            "0.61 for sharp-edged openings (see Notes)",
            valid=Valid(0.0, 1.0, "a discharge coefficient is a fraction, above 0 and at most 1", low_open=True))
    b.input("filter_loss", "Extra loss coefficient in the low opening", 3.8, "-",
            "screen, grille or filter on the velocity through the low opening; 0 for none (see Notes)",
            valid=Valid(0.0, 1000.0, "a loss coefficient is not negative; above 1000 the opening is as good as "
                        "closed"))
    sealed.surroundings_inputs(b)

    # ------------------------------------------------------------------ Calculation
    sealed.geometry_steps(b)
    vent = vent_row(inlet_area="=inlet_area", outlet_area="=outlet_area", height="=vent_height",
                    discharge="=discharge", extra_loss="=filter_loss")
    pair, fluid, picks = sealed.network_tables(
        b, extra=[vent], title="Thermal network: branches (from = surface, to = fluid for convection; "
                               "the vent from the internal air to the ambient)")
    b.section("Tables", "The same cabinet sealed (for comparison): branches; boundaries as above")
    b.branch_table("Tables", sealed.network_branches(), "sealed_branches")

    sealed.solution_steps(b, pair, fluid)
    b.step("q_walls", "Heat lost through the walls (sides + top)", "=q_conv_sides+q_rad_sides+q_conv_top+q_rad_top",
           "W")
    b.step("q_air", "Heat carried out by the air (vent branch)", f'=NET_HEAT({pair}, "vent", {fluid})', "W")
    b.step("airflow", "Volume flow of ambient air drawn in (vent branch)", f'=NET_AIRFLOW({pair}, "vent", {fluid})',
           "m³/s")
    b.step("heat_out", "Total heat loss (walls + air)", "=q_walls+q_air", "W")
    b.step("balance", "Energy balance: heat input - heat loss", "=heat_in-heat_out", "W", "should be ~0",
           number_format="0.0E+00")

    b.section("Calculation", "Airflow through the openings: the stack balance from the solved temperatures")
    b.step("gravity", "Standard acceleration of gravity", f"={STANDARD_GRAVITY!r}", "m/s²",
           "g_n, exact: 3rd CGPM (1901), SI Brochure 9th ed.")
    b.step("rho_in", "Density of the internal air", "=AIR_DENSITY(t_air, air_pressure)", "kg/m³")
    b.step("rho_out", "Density of the ambient air", "=AIR_DENSITY(ambient_t, air_pressure)", "kg/m³")
    b.step("stack_dp", "Stack pressure (rho_out - rho_in) g H", "=(rho_out-rho_in)*gravity*vent_height", "Pa",
           "drives the flow; negative: downward", number_format="0.000")
    b.step("losses", "Losses of the two openings, S (pressure drop = m² S / 2)",
           "=IF(stack_dp>=0,(1/discharge^2+filter_loss)/(rho_out*inlet_area^2)+1/(discharge^2*rho_in*outlet_area^2),"
           "(1/discharge^2+filter_loss)/(rho_in*inlet_area^2)+1/(discharge^2*rho_out*outlet_area^2))",
           "1/(kg·m)", "air entering has the ambient density, air leaving the internal")
    b.step("mass_flow", "Mass flow of air, m = (2 |dp| / S)^(1/2)", "=SQRT(2*ABS(stack_dp)/losses)", "kg/s")
    b.step("volume_flow_check", "Check: volume flow m / rho_ambient", "=mass_flow/rho_out", "m³/s",
           "equals the vent branch's airflow above")
    b.step("cp_air", "Specific heat of air at the mean temperature", "=AIR_CP((t_air+ambient_t)/2, air_pressure)",
           "J/(kg·K)")
    b.step("q_air_check", "Check: m cp (T_air - T_ambient)", "=mass_flow*cp_air*(t_air-ambient_t)", "W",
           "equals the heat carried out by the air above")

    b.section("Calculation", "The same cabinet sealed")
    b.step("t_air_sealed", "Internal air temperature, openings closed",
           f'=NET_TEMP(sealed_branches, cab_bounds, "air_in", {fluid})', "°C")
    sealed.band_steps(b, pair, fluid)
    sealed.coefficient_steps(b)

    b.section("Calculation", "A fan instead: the airflow that would hold the limit")
    b.step("fan_rise", "Allowed rise of the air (limit - ambient)", "=max_internal_t-ambient_t", "K")
    b.step("fan_flow", "Airflow carrying all heat input with the air alone",
           f'=IF(fan_rise>0, AIRFLOW_FOR(heat_in, fan_rise, ambient_t, air_pressure), "{NO_FAN}")', "m³/s",
           "V = Q / (rho cp dT); the walls' share ignored")

    # ------------------------------------------------------------------ Results
    b.section("Results", "Cabinet temperatures")
    b.result("res_t_air", "Internal air temperature", "=t_air", "°C", "the air taken as well mixed")
    sealed.limit_results(b)
    b.result("res_t_outlet", "Outlet air temperature", "=t_air", "°C", "well mixed: the internal air leaves")
    b.result("res_t_sealed", "Internal air with the openings closed (sealed)", "=t_air_sealed", "°C")
    b.result("res_vent_gain", "Cooling gained by the openings (sealed - vented)", "=t_air_sealed-t_air", "K")
    b.section("Results", "Airflow")
    b.result("res_mass_flow", "Mass flow of air through the openings", "=airflow*rho_out", "kg/s")
    b.result("res_volume_flow", "Volume flow of ambient air drawn in", "=airflow*3600", "m³/h")
    b.result("res_direction", "Direction of the flow", '=IF(stack_dp>=0,"upward: in low, out high",'
             '"DOWNWARD: internal air colder than ambient")', text=True, fails=("DOWNWARD",))
    b.section("Results", "Heat balance")
    b.result("res_dissipation", "Internal dissipation", "=dissipation", "W")
    b.result("res_sun", "Absorbed sun (top + sides)", "=sun_top_w+sun_sides_w", "W")
    b.result("res_q_air", "Heat carried out by the air", "=q_air", "W")
    b.result("res_q_walls", "Heat lost through the walls", "=q_walls", "W")
    b.result("res_air_share", "Share carried by the air", "=100*q_air/heat_out", "%")
    b.result("res_balance", "Energy balance residual (input - loss)", "=balance", "W", number_format="0.0E+00")
    b.section("Results", "A fan instead")
    b.result("res_fan_flow", "Fan airflow that would hold the limit", '=IF(ISNUMBER(fan_flow), fan_flow*3600, fan_flow)',
             "m³/h", "all heat input by the air: on the safe side")
    sealed.validity_results(b, pair, fluid, picks)
    b.caution("Results", "Caution: mean internal air only - the air near the top, hot spots and components run "
                         "hotter, and wind, dust-laden filters and blocked openings change the airflow. Check against "
                         "the equipment and enclosure makers' ratings, applicable standards and licensed practice "
                         "(see Notes).")

    # ------------------------------------------------------------------ Notes
    ...
    b.section("Notes", "Method")
    b.paragraph("The cabinet is the sealed cabinet's thermal network (internal air, inner and outer faces of "
                "the sides and the top, ambient air and sky; natural convection inside and out, conduction "
                "through the walls, radiation to the ambient and the sky, absorbed sun at the outer faces) with "
                "one more branch, the vent: a low and a high opening through which the stack effect draws "
                "ambient air. The air leaves at the internal temperature and carries m cp (T_air - T_ambient) "
                "out of the cabinet. NET_SOLVE closes every balance, the airflow included, in one Newton "
                "iteration, with each density at its own temperature.")
    b.paragraph("Stack flow: the stack pressure (rho_ambient - rho_internal) g H, H the height between the "
                "openings' centres, is spent in the two openings in series, each an orifice of discharge "
                "coefficient Cd, the low one with the extra loss coefficient K on its own velocity: "
                "dp = m² / 2 [(1/Cd² + K) / (rho_in_low A_low²) + 1 / (Cd² rho_in_high A_high²)], each density "
                "that of the air passing the opening. The Calculation sheet re-computes m from the solved "
                "temperatures so a checker can follow it. Sources: the orifice equation and the stack pressure "
                "as in BS 5925:1991, clauses 9 and 12, and ASHRAE Handbook - Fundamentals, chapter Ventilation "
                "and Infiltration (both unverified, listed below); for equal openings and small temperature differences it "
                "is their Q = Cd A* (2 g H dT / T)^(1/2), 1/A*² = 1/A_low² + 1/A_high².")
    b.unverified("the orifice equation and stack pressure as in BS 5925:1991 clauses 9 and 12 and the ASHRAE "
                 "Handbook - Fundamentals, Ventilation and Infiltration")
    b.unverified("the discharge coefficient 0.61 of sharp-edged openings (BS 5925:1991)")
    b.paragraph("Discharge coefficient 0.61 (UNVERIFIED, listed below): the value the ventilation codes take for "
                "sharp-edged openings (BS 5925:1991); Kirchhoff's free-streamline contraction of a slot, "
                "pi/(pi+2) = 0.611, gives the same two digits. Rounded or deep openings pass more; at low "
                "velocities (small openings, small temperature differences) the coefficient falls. Use a "
                "maker's value for a louvre or grille where there is one.")
    b.section("Notes", "Loss coefficients of screens and grilles (on the velocity through the opening)")
    fractions = (0.3, 0.5, 0.7)

    def losses(kind):
        return ", ".join(f"{kind(f):.3g} at {f:.0%} open" for f in fractions)
    b.paragraph(f"Square-edged wire screen or perforated plate (insect screens): K = {losses(square_edge_screen)}. "
                f"Square-edged bar grille: K = {losses(square_edge_grill)}.")
    b.paragraph("Source: Blevins, Applied Fluid Dynamics Handbook (1984), as tabulated by the fluids library "
                "(fluids.filters.square_edge_screen, square_edge_grill), on the approach velocity. Filter mats: "
                "K = 2 dp / (rho v²) from the filter maker's pressure drop dp at face velocity v; a loaded filter "
                "loses far more than a clean one. Several layers in series add their K.")
    b.section("Notes", "A fan instead")
    b.paragraph("The fan airflow is the volume flow of ambient air that carries all heat input (dissipation and "
                "absorbed sun) with the air alone while it warms from the ambient to the limit: "
                "V = Q / (rho cp dT), rho at the ambient, cp at the mean (AIRFLOW_FOR; common practice). The "
                "walls' share is ignored, which is on the safe side. A fan delivers its rated flow only at no "
                "back-pressure: choose it from the maker's curve at the pressure drop of its openings and "
                "filters (a network airflow branch takes a fan curve).")
    b.spread_note("internal air temperature")
    b.section("Notes", "Correlations used (sources from the stillair registry)")
    sealed.correlation_notes(b)
    b.section("Notes", "Assumptions")
    b.paragraph("The internal air is well mixed at one temperature and leaves at it; real cabinets stratify, "
                "the air near the top and at the outlet is warmer than the mean. All dissipation is released to "
                "the air. The wind speed acts on the outer faces only (mixed convection, see the wind note above); "
                "wind pressure on the openings, which can help or oppose the stack flow, is not modelled. The openings are "
                "small against the walls; the walls keep their full areas. The floor is adiabatic. Results are "
                "steady state.")
    b.section("Notes", "Cautions")
    b.paragraph("Overheating of electrical equipment: this template gives the mean internal air temperature "
                "only. Hot spots and components run hotter; filters clog, openings get blocked, and a "
                "downward flow (internal air colder than the ambient) can draw in moisture and dust. Openings "
                "change the enclosure's protection against water and dust ingress. Defer to the equipment "
                "manufacturer's temperature ratings, the enclosure maker's data, the applicable standards and "
                "licensed practice before relying on a result.", caution=True)


TEMPLATE = Template(NAME, 3, "Ventilated outdoor cabinet",
                    "Internal air temperature of an outdoor cabinet cooled by the stack airflow through a low and "
                    "a high opening, with walls, sun and radiation, against a limit, and the fan airflow needed "
                    "instead.", build)
