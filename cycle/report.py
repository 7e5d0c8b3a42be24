"""Plain-text views of results, for people at a terminal."""

# Widest line of the design-point text [characters].
WIDTH = 100


def _line(label, value, unit="", fmt="{:.4g}"):
    if value is None:
        text = "-"
    elif isinstance(value, str):
        text = value
    else:
        text = fmt.format(value)
    return f"  {label:<44s} {text:>12s} {unit}".rstrip()


def _mode_text(spec):
    if spec.mode == "effectiveness":
        return f"effectiveness {spec.effectiveness:g}"
    if spec.mode == "min_approach":
        return f"minimum approach {spec.min_approach:g} K"
    return f"UA {spec.ua:g} W/K"


def _layout_text(sc):
    if sc.layout == "precooled":
        pc = sc.precooling
        how = (f"{pc.coolant} bath at {pc.coolant_pressure / 1e5:g} bar" if pc.coolant
               else f"refrigerator COP {pc.refrigerator_cop:g}" if pc.refrigerator_cop is not None
               else f"refrigerator at {pc.refrigerator_carnot_fraction:g} of Carnot")
        return (f"precooled to {pc.temperature:g} K ({how}); warm recuperator by "
                f"{_mode_text(sc.warm_recuperator)}, cold recuperator by {_mode_text(sc.cold_recuperator)}")
    if sc.layout == "dual-pressure":
        dp = sc.dual_pressure
        return (f"dual pressure, {dp.intermediate_pressure / 1e5:g} bar intermediate, "
                f"{dp.recirculated_fraction:g} recirculated; recuperator by {_mode_text(sc.recuperator)}")
    return f"simple cycle; recuperator by {_mode_text(sc.recuperator)}"


def format_result(result):
    """The design point as readable text: headline numbers, sizing, losses, solve and state table."""
    sc = result.scenario
    s = result.summary()
    out = [f"lhsim design point: {sc.name or 'unnamed scenario'}",
           f"  {sc.gas}, {sc.low_pressure / 1e5:g} -> {sc.high_pressure / 1e5:g} bar, "
           f"ambient {sc.ambient_temperature:g} K",
           f"  {_layout_text(sc)}",
           "", "Performance"]
    out += [
        _line("liquid yield (liquid / compressor flow)", s["liquid_yield"], "", "{:.5f}"),
        _line("work per kg compressed", s["work_kJ_per_kg_compressed"], "kJ/kg", "{:.1f}"),
        _line("work per kg liquid", s["work_kJ_per_kg_liquid"], "kJ/kg", "{:.0f}"),
    ]
    if sc.layout == "precooled":
        out += [
            _line("  of which compressor", s["compressor_work_kJ_per_kg_liquid"], "kJ/kg", "{:.0f}"),
            _line("  of which precooling", s["precooling_work_kJ_per_kg_liquid"], "kJ/kg", "{:.0f}"),
        ]
    out += [
        _line("ideal work of liquefaction", s["ideal_work_kJ_per_kg_liquid"], "kJ/kg", "{:.1f}"),
        _line("figure of merit", s["figure_of_merit"], "", "{:.4f}"),
        _line("throttle outlet temperature", s["throttle_outlet_temperature_K"], "K", "{:.2f}"),
        _line("throttle outlet quality (vapour fraction)", s["throttle_outlet_quality"], "", "{:.4f}"),
    ]
    if sc.layout == "precooled":
        out += ["", "Precooling"]
        out.append(_line("precooler duty per kg compressed", s["precooler_duty_kJ_per_kg_compressed"], "kJ/kg", "{:.2f}"))
        if "coolant_kg_per_kg_liquid" in s:
            out.append(_line(f"{sc.precooling.coolant} boiled off per kg liquid", s["coolant_kg_per_kg_liquid"], "kg/kg", "{:.3f}"))
    for name in result.recuperators:
        title = name.replace("_", " ").capitalize()
        out += ["", title]
        out += [
            _line("effectiveness", s[f"{name}_effectiveness"], "", "{:.4f}"),
            _line("critical effectiveness (no liquid below)", s[f"{name}_critical_effectiveness"], "", "{:.4f}"),
            _line("minimum approach", s[f"{name}_min_approach_K"], "K", "{:.2f}"),
            _line("  at fraction of duty from cold end", s[f"{name}_min_approach_position"], "", "{:.2f}"),
            _line("warm-end / cold-end approach",
                  f"{s[f'{name}_warm_end_approach_K']:.2f} / {s[f'{name}_cold_end_approach_K']:.2f}", "K"),
            _line("duty per kg compressed", s[f"{name}_duty_kJ_per_kg_compressed"], "kJ/kg", "{:.2f}"),
            _line("UA per unit compressor flow", s[f"{name}_UA_W_per_K_per_kg_per_s"], "W/K per kg/s", "{:.0f}"),
        ]
    if "compressor_flow_kg_per_h" in s:
        out += ["", "Production"]
        out += [
            _line("compressor flow", s["compressor_flow_kg_per_h"], "kg/h", "{:.2f}"),
            _line("liquid rate", s["liquid_rate_kg_per_h"], "kg/h", "{:.3f}"),
            _line("liquid rate (saturated liquid)", s["liquid_rate_L_per_h"], "L/h", "{:.3f}"),
            _line("compressor power", s["compressor_power_kW"], "kW", "{:.3f}"),
        ]
        if sc.layout == "precooled":
            out.append(_line("precooling power (work charged)", s["precooling_power_kW"], "kW", "{:.3f}"))
            if "coolant_kg_per_h" in s:
                out.append(_line(f"{sc.precooling.coolant} boiled off", s["coolant_kg_per_h"], "kg/h", "{:.3f}"))
        out += [
            _line("heat rejected (compressor and aftercooler)", s["heat_rejected_kW"], "kW", "{:.3f}"),
            _line("recuperator duty (all recuperators)", s["recuperator_duty_kW"], "kW", "{:.3f}"),
            _line("recuperator UA (all recuperators)", s["recuperator_UA_W_per_K"], "W/K", "{:.1f}"),
            _line("cold-box heat leak", s["heat_leak_W"], "W", "{:.3g}"),
        ]
    out += ["", "Where the work goes (exergy, per kg of liquid)", format_exergy(result)]
    import textwrap

    out += ["", "Solve"] + [textwrap.fill(line, WIDTH, initial_indent="  ", subsequent_indent="    ")
                            for line in solve_lines(result)]
    out += ["", "Streams (flow per kg of compressor flow)", _state_table(result)]
    if result.warnings:
        out += ["", "Warnings"] + [f"  - {w}" for w in result.warnings]
    return "\n".join(out)


def solve_lines(result):
    """How each recuperator's recycle solve went, in words: one line each, then the energy balance."""
    lines = []
    for name, rep in result.sections.items():
        label = name.replace("_", " ")
        unit = "" if rep.residual_unit == "-" else f" {rep.residual_unit}"
        if rep.status == "met" and rep.converged:
            lines.append(f"{label}: converged in {rep.iterations} iterations ({rep.function_calls} evaluations); "
                         f"target {rep.target:.6g}{unit}, residual {_number(rep.residual, '{:.1e}')}{unit} "
                         f"(allowed {rep.residual_tolerance:.0e}{unit})")
        elif rep.status == "limit":
            lines.append(f"{label}: target not reached, {rep.target:.6g}{unit} asked, {rep.achieved:.6g}{unit} is all "
                         f"the streams can use (the result is the perfect exchanger's; see Warnings)")
        else:
            lines.append(f"{label}: NOT converged after {rep.iterations} iterations: {rep.achieved:.6g}{unit} against "
                         f"{rep.target:.6g}{unit} asked (see Warnings)")
    lines.append(f"energy balance of the whole plant closes to {abs(result.energy_balance_residual):.0e} of the work")
    return lines


def _number(value, fmt):
    """``fmt`` applied to ``value``, without the sign of a value that rounds to zero."""
    text = fmt.format(value)
    if text.startswith("-") and not any(c in "123456789" for c in text.split("e")[0]):
        text = text[1:]
    return text


def format_exergy(result):
    """Ideal work and each unit's exergy loss, largest first, with shares of the actual work."""
    total = result.work_per_kg_liquid
    rows = [("ideal work of liquefaction", result.ideal_work_per_kg_liquid)]
    rows += [(name.replace("_", " "), value) for name, value in result.exergy_losses_per_kg_liquid().items()]
    lines = [f"  {'':<44s} {'kJ/kg':>12s} {'share':>7s}"]
    for label, value in rows:
        lines.append(f"  {label:<44s} {value / 1e3:12.1f} {100 * value / total:6.1f} %")
    lines.append(f"  {'actual work (sum)':<44s} {total / 1e3:12.1f} {100.0:6.1f} %")
    return "\n".join(lines)


def _state_table(result):
    import pandas as pd

    frame = pd.DataFrame(result.state_rows())
    table = pd.DataFrame({
        "#": frame["number"],
        "stream": frame["stream"],
        "T [K]": frame["temperature_K"].map("{:.2f}".format),
        "p [bar]": frame["pressure_bar"].map("{:.4g}".format),
        "h [kJ/kg]": frame["enthalpy_kJ_per_kg"].map("{:.2f}".format),
        "s [kJ/kg K]": frame["entropy_kJ_per_kg_K"].map("{:.4f}".format),
        "x [-]": frame["quality"].map(lambda q: "" if q is None or q != q else f"{q:.4f}"),
        "flow [-]": frame["flow_per_kg_compressed"].map("{:.4f}".format),
    })
    if "mass_flow_kg_per_h" in frame:
        table["flow [kg/h]"] = frame["mass_flow_kg_per_h"].map("{:.3f}".format)
    return table.to_string(index=False)


def format_gas(info):
    """The ``lhsim gas`` report as readable text."""
    inv = info["inversion_temperatures_K"]
    inv_text = ", ".join(f"{t:.1f}" for t in inv) if inv else "none (mu_JT keeps one sign along this isobar)"
    sat = info["saturation_temperature_K"]
    lines = [
        f"{info['gas']} at {info['temperature_K']:g} K and {info['pressure_bar']:g} bar ({info['phase']})",
        _line("density", info["density_kg_per_m3"], "kg/m3"),
        _line("enthalpy (CoolProp reference state)", info["enthalpy_kJ_per_kg"], "kJ/kg", "{:.3f}"),
        _line("entropy (CoolProp reference state)", info["entropy_kJ_per_kg_K"], "kJ/(kg K)", "{:.4f}"),
        _line("Joule-Thomson coefficient (dT/dp)_h", info["jt_coefficient_K_per_bar"], "K/bar", "{:.4f}"),
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

    for key, value in found["vary"].items():
        kind = key_kind(key)
        if kind == "pressure":
            lines.append(_line(key, value / 1e5, "bar", "{:.2f}"))
        elif kind in ("temperature", "temperature_difference"):
            lines.append(_line(key, value, "K", "{:.2f}"))
        else:
            lines.append(_line(key + " (SI)", value, "", "{:.6g}"))
    lines += [
        _line("liquid yield", s["liquid_yield"], "", "{:.5f}"),
        _line("work per kg liquid", s["work_kJ_per_kg_liquid"], "kJ/kg", "{:.0f}"),
        _line("figure of merit", s["figure_of_merit"], "", "{:.4f}"),
    ]
    if "compressor_power_kW" in s:
        lines += [_line("compressor flow", s["compressor_flow_kg_per_h"], "kg/h", "{:.2f}"),
                  _line("compressor power", s["compressor_power_kW"], "kW", "{:.3f}")]
    return "\n".join(lines)
