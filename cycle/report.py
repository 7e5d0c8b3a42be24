"""Plain-text views of results, for people at a terminal."""

# Widest line of the design-point text [characters].
WIDTH = 100


def number(value, fmt="{:.4g}"):
    """``value`` formatted by ``fmt``; ``-`` for None or a non-finite value; no sign on a value
    that rounds to zero (never ``-0.0``)."""
    if value is None or (isinstance(value, float) and value != value):
        return "-"
    if isinstance(value, str):
        return value
    text = fmt.format(value)
    mantissa = text.split("e")[0]
    if text.startswith("-") and not any(c in "123456789" for c in mantissa):
        text = text[1:]
    return text


def _line(label, value, unit="", fmt="{:.4g}"):
    return f"  {label:<44s} {number(value, fmt):>12s} {unit}".rstrip()


def _mode_text(spec):
    g = spec.geometry
    hardware = ""
    if g is not None:
        hardware = (f"{g.tubes} tube-in-tube pair{'s' if g.tubes > 1 else ''}, {g.inner_inside * 1e3:g}/"
                    f"{g.inner_outside * 1e3:g} mm in {g.outer_inside * 1e3:g} mm")
    if spec.mode == "length":
        return f"its geometry ({hardware}, {g.length:g} m long, rated)"
    if spec.mode == "effectiveness":
        text = f"effectiveness {spec.effectiveness:g}"
    elif spec.mode == "min_approach":
        text = f"minimum approach {spec.min_approach:g} K"
    else:
        text = f"UA {spec.ua:g} W/K"
    return f"{text} ({hardware}: length found)" if g is not None else text


def _layout_text(sc):
    if sc.layout == "precooled":
        pc = sc.precooling
        how = (f"{pc.coolant} bath at {pc.coolant_pressure / 1e5:g} bar" if pc.coolant
               else f"refrigerator COP {pc.refrigerator_cop:g}" if pc.refrigerator_cop is not None
               else f"refrigerator at {pc.refrigerator_carnot_fraction:g} of Carnot"
               if pc.refrigerator_carnot_fraction is not None
               else f"cooler by its capacity curve, {pc.cooler_input_power / 1e3:g} kW input; the temperature "
                    f"where the load equals the capacity")
        return (f"precooled to {pc.temperature:.6g} K ({how}); warm recuperator by "
                f"{_mode_text(sc.warm_recuperator)}, cold recuperator by {_mode_text(sc.cold_recuperator)}")
    if sc.layout == "dual-pressure":
        dp = sc.dual_pressure
        return (f"dual pressure, {dp.intermediate_pressure / 1e5:g} bar intermediate, "
                f"{dp.recirculated_fraction:g} recirculated; recuperator by {_mode_text(sc.recuperator)}")
    return f"simple cycle; recuperator by {_mode_text(sc.recuperator)}"


CRITICAL_NONE = "none needed: throttling alone makes liquid"
UA_UNBOUNDED = "unbounded (streams touch)"


def summary_sections(result):
    """The design point as titled sections of (label, value text, unit) rows, leaving out rows
    that do not apply to the layout.  The text output and the HTML report both show these."""
    sc = result.scenario
    s = result.summary()
    precooled = sc.layout == "precooled"
    perf = [
        ("liquid yield (liquid / compressor flow)", number(s["liquid_yield"], "{:.5f}"), ""),
        ("work per kg compressed", number(s["work_kJ_per_kg_compressed"], "{:.1f}"), "kJ/kg"),
        ("work per kg liquid", number(s["work_kJ_per_kg_liquid"], "{:.0f}"), "kJ/kg"),
    ]
    if precooled:
        perf += [("  of which compressor", number(s["compressor_work_kJ_per_kg_liquid"], "{:.0f}"), "kJ/kg"),
                 ("  of which precooling", number(s["precooling_work_kJ_per_kg_liquid"], "{:.0f}"), "kJ/kg")]
    perf.append(("ideal work of liquefaction", number(s["ideal_work_kJ_per_kg_liquid"], "{:.1f}"), "kJ/kg"))
    conv = result.conversion
    if conv is not None:
        perf.append(("  for the product as made", product_words(conv), ""))
    perf += [
        ("figure of merit", number(s["figure_of_merit"], "{:.4f}"), ""),
        ("throttle outlet temperature", number(s["throttle_outlet_temperature_K"], "{:.2f}"), "K"),
        ("throttle outlet quality (vapour fraction)", number(s["throttle_outlet_quality"], "{:.4f}"), ""),
    ]
    sections = [("Performance", perf)]
    if conv is not None:
        sections.append(("Ortho-para hydrogen", _conversion_rows(conv, s)))
    sections.append(("Compressor", _compressor_rows(result, s)))
    if precooled:
        pc = sc.precooling
        rows = []
        if pc.cooler_capacity is not None:
            rows.append(("precooling temperature (load = capacity)", number(pc.temperature, "{:.2f}"), "K"))
        else:
            rows.append(("precooling temperature", number(pc.temperature, "{:.2f}"), "K"))
        rows.append(("precooler duty per kg compressed", number(s["precooler_duty_kJ_per_kg_compressed"], "{:.2f}"),
                     "kJ/kg"))
        if "precooler_load_W" in s:
            rows.append(("precooler load", number(s["precooler_load_W"], "{:.1f}"), "W"))
        if result.cooler_capacity is not None:
            rows += [("cooler capacity at that temperature", number(result.cooler_capacity, "{:.1f}"), "W"),
                     ("cooler input power (charged to the product)", number(pc.cooler_input_power / 1e3, "{:.3f}"),
                      "kW")]
        if "coolant_kg_per_kg_liquid" in s:
            rows.append((f"{sc.precooling.coolant} boiled off per kg liquid",
                         number(s["coolant_kg_per_kg_liquid"], "{:.3f}"), "kg/kg"))
        if "coolant_consumption_kg_per_h" in s:
            rows += [(f"{pc.coolant} consumption", number(s["coolant_consumption_kg_per_h"], "{:.3f}"), "kg/h"),
                     (f"{pc.coolant} consumption (saturated liquid)",
                      number(s["coolant_consumption_L_per_h"], "{:.2f}"), "L/h")]
        sections.append(("Precooling", rows))
    q = result.receiver_vapour_fraction
    if q is not None:
        i = sc.dual_pressure.recirculated_fraction
        rows = [("vapour fraction of the first valve's outflow", number(q, "{:.4f}"), ""),
                ("returned (recirculated fraction)", number(i, "{:.4f}"), "")]
        rows.append(("vapour passed on to the second valve", number(q - i, "{:.4f}"), "") if q >= i else
                    ("liquid returned with the vapour", number(i - q, "{:.4f}"), ""))
        sections.append(("Intermediate receiver (per kg compressed)", rows))
    for k, valve in enumerate(result.valves, start=1):
        title = "Throttle valve" if len(result.valves) == 1 else f"Throttle valve {k} of {len(result.valves)}"
        rows = [
            ("inlet -> outlet pressure",
             f"{number(valve.inlet_pressure / 1e5, '{:.2f}')} -> {number(valve.outlet_pressure / 1e5, '{:.3g}')}", "bar"),
            ("critical mass flux (HEM, isentropic)", number(valve.critical_mass_flux, "{:.4g}"), "kg/(m2 s)"),
            ("choked", "yes" if valve.choked else "no", ""),
            ("  throat pressure", number(valve.throat_pressure / 1e5, "{:.3g}"), "bar"),
        ]
        if valve.orifice_diameter is not None:
            rows.append((f"minimum orifice diameter (Cd {valve.discharge_coefficient:g})",
                         number(valve.orifice_diameter * 1e3, "{:.3f}"), "mm"))
        sections.append((title, rows))
    for name, rec in result.recuperators.items():
        rows = [("effectiveness", number(rec.effectiveness, "{:.4f}"), "")]
        crit = rec.critical_effectiveness
        if crit is not None:
            rows.append(("critical effectiveness (no liquid below)",
                         number(crit, "{:.4f}") if crit > 0 else CRITICAL_NONE, ""))
        ua = s[f"{name}_UA_W_per_K_per_kg_per_s"]
        rows += [
            ("minimum approach", number(rec.min_approach, "{:.2f}"), "K"),
            ("  at fraction of duty from cold end", number(rec.min_approach_position, "{:.2f}"), ""),
            ("warm-end / cold-end approach",
             f"{number(rec.warm_end_approach, '{:.2f}')} / {number(rec.cold_end_approach, '{:.2f}')}", "K"),
            ("duty per kg compressed", number(rec.duty / 1e3, "{:.2f}"), "kJ/kg"),
            ("UA per unit compressor flow", number(ua, "{:.0f}") if ua is not None else UA_UNBOUNDED,
             "W/K per kg/s" if ua is not None else ""),
        ]
        if rec.profile.rating is not None:
            rows += [
                ("length (tube-in-tube)", number(s[f"{name}_length_m"], "{:.3f}"), "m"),
                ("heat-transfer area (inner tubes, outside)", number(s[f"{name}_area_m2"], "{:.4f}"), "m2"),
                ("high-pressure / return-side pressure drop",
                 f"{number(s[f'{name}_high_side_pressure_drop_bar'], '{:.4f}')} / "
                 f"{number(s[f'{name}_low_side_pressure_drop_bar'], '{:.4f}')}", "bar"),
                ("least Reynolds number, high / return side",
                 f"{number(s[f'{name}_min_reynolds_high'], '{:.0f}')} / {number(s[f'{name}_min_reynolds_low'], '{:.0f}')}",
                 ""),
                ("fastest gas velocity", number(s[f"{name}_max_velocity_m_per_s"], "{:.1f}"), "m/s"),
            ]
        sections.append((name.replace("_", " ").capitalize(), rows))
    if "compressor_flow_kg_per_h" in s:
        rows = [
            ("compressor flow", number(s["compressor_flow_kg_per_h"], "{:.2f}"), "kg/h"),
            ("liquid rate", number(s["liquid_rate_kg_per_h"], "{:.3f}"), "kg/h"),
            ("liquid rate (saturated liquid)", number(s["liquid_rate_L_per_h"], "{:.3f}"), "L/h"),
            ("liquid rate (gas equivalent, normal)", number(s["liquid_rate_Nm3_per_h"], "{:.3f}"), "Nm3/h"),
            ("compressor power", number(s["compressor_power_kW"], "{:.3f}"), "kW"),
        ]
        if precooled:
            rows.append(("precooling power (work charged)", number(s["precooling_power_kW"], "{:.3f}"), "kW"))
            if "coolant_kg_per_h" in s:
                rows.append((f"{sc.precooling.coolant} boiled off", number(s["coolant_kg_per_h"], "{:.3f}"), "kg/h"))
        ua_total = s["recuperator_UA_W_per_K"]
        rows += [
            ("heat rejected (compressor and aftercooler)", number(s["heat_rejected_kW"], "{:.3f}"), "kW"),
            ("recuperator duty (all recuperators)", number(s["recuperator_duty_kW"], "{:.3f}"), "kW"),
            ("recuperator UA (all recuperators)", number(ua_total, "{:.1f}") if ua_total is not None
             else UA_UNBOUNDED, "W/K" if ua_total is not None else ""),
        ]
        if sc.heat_leak:
            rows.append(("cold-box heat leak", number(s["heat_leak_W"], "{:.3g}"), "W"))
        sections.append(("Production", rows))
    return sections


# Where each catalyst place's conversion heat goes, in words.
CONVERSION_HEAT_ROWS = {
    "precooler": "  in the precooler (to the precooling)",
    "continuous": "  in the cold recuperator (to return gas)",
    "separator": "  in the separator (boils off product)",
}


def product_words(conv):
    """The product the ideal work is for, in a few words: normal, equilibrium or its para fraction."""
    if not conv.places:
        return "normal H2"
    if "separator" in conv.places:
        return "equilibrium"
    return f"para {conv.product_para_fraction:.4f}"


def _conversion_rows(conv, s):
    """Hydrogen: where the catalyst sits, the product's para fraction, the conversion heat and
    what self-conversion boils off in storage."""
    rows = [("catalyst", ", ".join(conv.places) if conv.places else "none", "")]
    rows.append(("product para fraction", number(s["product_para_fraction"], "{:.4f}"), ""))
    rows.append(("conversion heat, cold box (per kg liquid)",
                 number(s["conversion_heat_kJ_per_kg_liquid"], "{:.1f}"), "kJ/kg"))
    y = s["liquid_yield"]
    rows += [(CONVERSION_HEAT_ROWS[place], number(q / y / 1e3, "{:.1f}"), "kJ/kg") for place, q in conv.heat.items()]
    rows += [("stored liquid lost to self-conversion, 24 h",
              number(100.0 * s["storage_loss_fraction_24h"], "{:.2f}"), "%"),
             ("  after 100 h", number(100.0 * s["storage_loss_fraction_100h"], "{:.2f}"), "%")]
    return rows


def _compressor_rows(result, s):
    """The compressor block: model, flows at suction and normal conditions, powers, hottest discharge."""
    spec = result.scenario.compressor
    stages = result.compressor_stage_rows()
    if spec.model == "isothermal":
        rows = [("model", "isothermal", ""),
                ("  isothermal efficiency", number(spec.isothermal_efficiency, "{:.3f}"), "")]
    else:
        per = " per section" if len(result.compressions) > 1 else ""
        rows = [("stages (isentropic efficiency)", f"{spec.stages}{per} ({spec.isentropic_efficiency:g})", ""),
                ("hottest stage discharge", number(s["max_discharge_temperature_K"], "{:.1f}"), "K")]
    rows.append(("overall pressure ratio", number(stages[-1]["discharge_pressure_bar"]
                                                  / stages[0]["suction_pressure_bar"], "{:.1f}"), ""))
    if "compressor_gas_power_kW" in s:
        rows += [
            ("suction volume flow (actual, at suction)", number(s["compressor_suction_volume_flow_m3_per_h"], "{:.3f}"),
             "m3/h"),
            ("normal volume flow (0 degC, 1.01325 bar)", number(s["compressor_normal_volume_flow_Nm3_per_h"], "{:.3f}"),
             "Nm3/h"),
            ("gas power", number(s["compressor_gas_power_kW"], "{:.3f}"), "kW"),
            (f"shaft power (mechanical efficiency {spec.mechanical_efficiency:g})",
             number(s["compressor_shaft_power_kW"], "{:.3f}"), "kW"),
            (f"electric power (motor efficiency {spec.motor_efficiency:g})",
             number(s["compressor_electric_power_kW"], "{:.3f}"), "kW"),
        ]
    return rows


# Columns of the compressor stage table: (heading, row key, format).
STAGE_COLUMNS = [
    ("stage", "stage", "{:d}"),
    ("p in [bar]", "suction_pressure_bar", "{:.3f}"),
    ("p out [bar]", "discharge_pressure_bar", "{:.3f}"),
    ("ratio", "pressure_ratio", "{:.3f}"),
    ("T in [K]", "suction_temperature_K", "{:.1f}"),
    ("T out [K]", "discharge_temperature_K", "{:.1f}"),
    ("V in [m3/h]", "suction_volume_flow_m3_per_h", "{:.3f}"),
    ("P [kW]", "power_kW", "{:.3f}"),
    ("cooler [kW]", "intercooler_duty_kW", "{:.3f}"),
]


def stage_table(result):
    """(headings, rows of cells, notes) of the compressor stage table; the columns of flows and
    powers only with a production target."""
    rows = result.compressor_stage_rows()
    columns = [c for c in STAGE_COLUMNS if any(r.get(c[1]) is not None for r in rows) or c[1] == "discharge_temperature_K"]
    cells = [[number(r[key], fmt) if r.get(key) is not None else "-" for _, key, fmt in columns] for r in rows]
    sections = {r["section"] for r in rows}
    notes = []
    if sections != {None}:
        columns = [("section", None, None)] + columns
        cells = [[r["section"].split("-")[0]] + c for r, c in zip(rows, cells)]
        notes.append("section: the low- and high-pressure sections of the compressor")
    if rows and rows[0]["discharge_temperature_K"] is None:
        notes.append(rows[0]["model"])
    notes.append("V in: actual volume flow at the stage suction; P: gas power; cooler: the intercooler after "
                 "each stage, after the last stage the aftercooler")
    return [h for h, _, _ in columns], cells, notes


def format_stages(result):
    """The compressor stage table as text."""
    import textwrap

    headings, cells, notes = stage_table(result)
    widths = [max(len(h), *(len(c[k]) for c in cells)) for k, h in enumerate(headings)]
    lines = ["  " + " ".join(f"{h:>{w}s}" for h, w in zip(headings, widths))]
    lines += ["  " + " ".join(f"{v:>{w}s}" for v, w in zip(c, widths)) for c in cells]
    lines += [textwrap.fill(n, WIDTH, initial_indent="  ", subsequent_indent="    ") for n in notes]
    return "\n".join(lines)


def format_result(result):
    """The design point as readable text: headline numbers, sizing, losses, solve and state table."""
    import textwrap

    sc = result.scenario
    out = [f"lhsim design point: {sc.name or 'unnamed scenario'}",
           f"  {sc.gas}, {sc.low_pressure / 1e5:g} -> {sc.high_pressure / 1e5:g} bar, "
           f"ambient {sc.ambient_temperature:g} K",
           textwrap.fill(_layout_text(sc), WIDTH, initial_indent="  ", subsequent_indent="    ")]
    for title, rows in summary_sections(result):
        out += ["", title] + [f"  {label:<44s} {value:>12s} {unit}".rstrip() for label, value, unit in rows]
        if title == "Compressor":
            out += ["", "Compressor stages", format_stages(result)]
    out += ["", "Where the work goes (exergy, per kg of liquid)", format_exergy(result)]
    out += ["", "Solve"] + [textwrap.fill(line, WIDTH, initial_indent="  ", subsequent_indent="    ")
                            for line in solve_lines(result)]
    out += ["", "Streams (flow per kg of compressor flow)", format_states(result)]
    if result.conversion is not None and result.conversion.places:
        out.append(textwrap.fill(ORTHO_PARA_STATES_NOTE, WIDTH, initial_indent="  ", subsequent_indent="    "))
    if result.warnings:
        out += ["", "Warnings"] + [textwrap.fill(w, WIDTH, initial_indent="  - ", subsequent_indent="    ")
                                   for w in result.warnings]
    return "\n".join(out)


ORTHO_PARA_STATES_NOTE = ("para: the para fraction of each stream; h and s are on the common ortho-para "
                          "reference (parahydrogen's saturated liquid at 1 atm is zero; normal hydrogen sits "
                          "about 526 kJ/kg and 9.1 kJ/(kg K) above it), see docs/ortho-para-hydrogen.md")


def solve_lines(result):
    """How each recuperator's recycle solve went, in words: one line each, then the energy balance."""
    lines = []
    for name, rep in result.sections.items():
        label = name.replace("_", " ")
        unit = "" if rep.residual_unit == "-" else f" {rep.residual_unit}"
        if rep.status == "met" and rep.converged:
            how = {"newton-on-estimates": ", Newton's method on the marches", "brentq": ", Brent's method"}.get(
                rep.method, "")
            lines.append(f"{label}: converged in {rep.iterations} iterations ({rep.function_calls} evaluations{how}); "
                         f"target {rep.target:.6g}{unit}, residual {number(rep.residual, '{:.1e}')}{unit} "
                         f"(allowed {rep.residual_tolerance:.0e}{unit})")
        elif rep.status == "limit":
            lines.append(f"{label}: target not reached, {rep.target:.6g}{unit} asked, {rep.achieved:.6g}{unit} is all "
                         f"the streams can use (the result is the perfect exchanger's; see Warnings)")
        else:
            lines.append(f"{label}: NOT converged after {rep.iterations} iterations: {rep.achieved:.6g}{unit} against "
                         f"{rep.target:.6g}{unit} asked (see Warnings)")
    balance = f"energy balance of the whole plant closes to {abs(result.energy_balance_residual):.0e} of the work"
    conv = result.conversion
    if conv is not None and conv.heat:
        from cycle.conversion import WHERE

        parts = ", ".join(f"{q / 1e3:.2f} kJ/kg {WHERE[place]}" for place, q in conv.heat.items())
        balance += f"; it counts the ortho-para conversion heat released, per kg compressed: {parts}"
    lines.append(balance)
    return lines


def exergy_rows(result):
    """(label, kJ per kg of liquid, share of the actual work in %) rows: the ideal work, each
    unit's exergy loss largest first, and the actual work."""
    from cycle.results import loss_label

    total = result.work_per_kg_liquid
    rows = [("ideal work of liquefaction", result.ideal_work_per_kg_liquid)]
    rows += [(loss_label(name), value) for name, value in result.exergy_losses_per_kg_liquid().items()]
    rows.append(("actual work (sum)", total))
    return [(label, value / 1e3, 100.0 * value / total) for label, value in rows]


def format_exergy(result):
    """Ideal work and each unit's exergy loss, largest first, with shares of the actual work."""
    lines = [f"  {'':<44s} {'kJ/kg':>12s} {'share':>7s}"]
    for label, value, share in exergy_rows(result):
        lines.append(f"  {label:<44s} {number(value, '{:.1f}'):>12s} {number(share, '{:.1f}'):>6s} %")
    return "\n".join(lines)


# Columns of the state table: (heading, row key, format); one precision per column.
STATE_COLUMNS = [
    ("T [K]", "temperature_K", "{:.2f}"),
    ("p [bar]", "pressure_bar", "{:.3f}"),
    ("h [kJ/kg]", "enthalpy_kJ_per_kg", "{:.2f}"),
    ("s [kJ/kg K]", "entropy_kJ_per_kg_K", "{:.4f}"),
    ("x [-]", "quality", "{:.4f}"),
    ("para [-]", "para_fraction", "{:.4f}"),
    ("flow [-]", "flow_per_kg_compressed", "{:.4f}"),
    ("flow [kg/h]", "mass_flow_kg_per_h", "{:.3f}"),
]


def state_cells(row, columns=STATE_COLUMNS):
    """The state-table cells of one ``CycleResult.state_rows()`` row (blank where not given)."""
    return [number(row[key], fmt) if row.get(key) is not None else "" for _, key, fmt in columns]


def state_columns(rows):
    """The columns of :data:`STATE_COLUMNS` that these rows have (flow in kg/h needs a production target)."""
    return [c for c in STATE_COLUMNS if any(c[1] in r for r in rows)]


def format_states(result, width=WIDTH):
    """The state table within ``width`` characters: stream names left-aligned and wrapped."""
    import textwrap

    rows = result.state_rows()
    columns = state_columns(rows)
    cells = [state_cells(r, columns) for r in rows]
    widths = [max(len(h), *(len(c[k]) for c in cells)) for k, (h, _, _) in enumerate(columns)]
    name_width = max(12, width - sum(w + 1 for w in widths) - 3)
    lines = [f"{'#':>2s} {'stream':<{name_width}s}" + "".join(f" {h:>{w}s}" for (h, _, _), w in zip(columns, widths))]
    for r, c in zip(rows, cells):
        name = textwrap.wrap(r["stream"], name_width) or [""]
        lines.append(f"{r['number']:>2d} {name[0]:<{name_width}s}" + "".join(f" {v:>{w}s}" for v, w in zip(c, widths)))
        lines += [f"   {more}" for more in name[1:]]
    return "\n".join(lines)


def format_gas(info):
    """The ``lhsim gas`` report as readable text."""
    inv = info["inversion_temperatures_K"]
    inv_text = ", ".join(f"{t:.1f}" for t in inv) if inv else "none (mu_JT keeps one sign along this isobar)"
    sat = info["saturation_temperature_K"]
    quality = info.get("quality")
    phase = info["phase"] if quality is None or quality in (0.0, 1.0) else f"{info['phase']}, quality {quality:g}"
    jt_label = "Joule-Thomson coefficient " + ("(dT_sat/dp)" if quality is not None else "(dT/dp)_h")
    lines = [
        f"{info['gas']} at {info['temperature_K']:g} K and {info['pressure_bar']:g} bar ({phase})",
        _line("density", info["density_kg_per_m3"], "kg/m3"),
        _line("enthalpy (CoolProp reference state)", info["enthalpy_kJ_per_kg"], "kJ/kg", "{:.3f}"),
        _line("entropy (CoolProp reference state)", info["entropy_kJ_per_kg_K"], "kJ/(kg K)", "{:.4f}"),
        _line(jt_label, info["jt_coefficient_K_per_bar"], "K/bar", "{:.4f}"),
        _line("saturation temperature at this pressure",
              sat if sat is not None else "none (supercritical)", "K" if sat is not None else "", "{:.3f}"),
        f"  {'inversion temperatures at this pressure':<44s} {inv_text}{' K' if inv else ''}",
        _line("maximum inversion temperature (p -> 0)", info["max_inversion_temperature_K"]
              if info["max_inversion_temperature_K"] is not None else "not found",
              "K" if info["max_inversion_temperature_K"] is not None else "", "{:.1f}"),
        _line("critical point", f"{info['critical_temperature_K']:.3f} K, {info['critical_pressure_bar']:.3f} bar"),
        _line("triple point", f"{info['triple_point_temperature_K']:.3f} K, {info['triple_point_pressure_bar']:.4g} bar"),
    ]
    return "\n".join(lines)


def format_comparison(rows):
    """``lhsim compare`` rows as a ranked table."""
    import pandas as pd

    def num(row, key, fmt):
        value = row.get(key)
        return "" if value is None else fmt.format(value)

    table = pd.DataFrame({
        "rank": [r["rank"] for r in rows],
        "gas": [r["gas"] for r in rows],
        "status": [r["status"] for r in rows],
        "figure of merit": [num(r, "figure_of_merit", "{:.4f}") for r in rows],
        "yield": [num(r, "liquid_yield", "{:.4f}") for r in rows],
        "work [kJ/kg liquid]": [num(r, "work_kJ_per_kg_liquid", "{:.0f}") for r in rows],
    })
    if any("high_pressure" in r for r in rows):
        table["high pressure [bar]"] = [num(r, "high_pressure", "{:.1f}") if r.get("high_pressure") is None
                                        else f"{r['high_pressure'] / 1e5:.1f}" for r in rows]
    if any(r.get("compressor_flow_kg_per_h") is not None for r in rows):
        table["compressor flow [kg/h]"] = [num(r, "compressor_flow_kg_per_h", "{:.2f}") for r in rows]
        table["compressor power [kW]"] = [num(r, "compressor_power_kW", "{:.3f}") for r in rows]
    lines = [table.to_string(index=False)]
    bounds = [f"  {r['gas']}: {r['note']}" for r in rows if r.get("on_bound")]
    if bounds:
        lines += ["", "Optimum on a bound of the search (the best pressure may lie outside it):"] + bounds
    notes = [f"  {r['gas']}: {r['message']}" for r in rows if r["status"] != "ok"]
    if notes:
        lines += ["", "Why some gases make no liquid here:"] + notes
    return "\n".join(lines)


def format_optimum(found):
    """``lhsim optimize`` result as readable text."""
    s = found["summary"]
    lines = [f"optimum for {found['goal']} ({found['evaluations']} evaluations, "
             f"{'converged' if found['converged'] else 'NOT converged'})"]
    from cycle.scenario import key_kind

    on_bound = found.get("on_bound") or {}
    for key, value in found["vary"].items():
        kind = key_kind(key)
        side = f"  ({on_bound[key]} bound)" if key in on_bound else ""
        if kind == "pressure":
            lines.append(_line(key, value / 1e5, "bar", "{:.2f}") + side)
        elif kind in ("temperature", "temperature_difference"):
            lines.append(_line(key, value, "K", "{:.2f}") + side)
        else:
            lines.append(_line(key + " (SI)", value, "", "{:.6g}") + side)
    lines += [
        _line("liquid yield", s["liquid_yield"], "", "{:.5f}"),
        _line("work per kg liquid", s["work_kJ_per_kg_liquid"], "kJ/kg", "{:.0f}"),
        _line("figure of merit", s["figure_of_merit"], "", "{:.4f}"),
    ]
    if "compressor_power_kW" in s:
        lines += [_line("compressor flow", s["compressor_flow_kg_per_h"], "kg/h", "{:.2f}"),
                  _line("compressor power", s["compressor_power_kW"], "kW", "{:.3f}")]
    lines += [f"note: {note}" for note in found.get("notes", [])]
    return "\n".join(lines)
