"""One self-contained HTML report of a solved scenario: figures embedded, no network needed."""

import base64
import datetime
import html

from cycle.safety import CAUTIONS

_CSS = """
body { font-family: 'DejaVu Sans', Arial, sans-serif; color: #222; margin: 2em auto; max-width: 72em;
       padding: 0 1.5em; line-height: 1.45; }
h1 { font-size: 1.6em; margin-bottom: 0.1em; }
h2 { font-size: 1.2em; border-bottom: 2px solid #0072B2; padding-bottom: 0.15em; margin-top: 1.8em; }
.meta { color: #555; font-size: 0.9em; }
.caution { border-left: 6px solid #D55E00; background: #FFF4EC; padding: 0.6em 1em; margin: 1em 0; }
.warning { border-left: 6px solid #E69F00; background: #FFF9E6; padding: 0.4em 1em; margin: 0.4em 0; }
table { border-collapse: collapse; margin: 0.6em 0; font-size: 0.9em; }
th, td { border: 1px solid #D0D0D0; padding: 0.25em 0.6em; text-align: right; }
th { background: #EEF4FA; }
td.text, th.text { text-align: left; }
pre { background: #F6F6F6; padding: 0.8em; overflow-x: auto; font-size: 0.85em; }
figure { margin: 1em 0; }
figure img { max-width: 100%; border: 1px solid #E0E0E0; }
figcaption { color: #555; font-size: 0.9em; }
"""

REFERENCES = [
    "R. F. Barron, <i>Cryogenic Systems</i>, 2nd ed., Oxford University Press, 1985, ch. 3 (ideal work of "
    "liquefaction; simple, precooled and dual-pressure Linde-Hampson systems; heat-exchanger effectiveness).",
    "A. Bejan, <i>Advanced Engineering Thermodynamics</i>, Wiley (exergy and the Gouy-Stodola relation).",
    "B. Linnhoff et al., <i>A User Guide on Process Integration for the Efficient Use of Energy</i>, IChemE, "
    "1982 (composite curves, minimum approach).",
    "R. P. Brent, <i>Algorithms for Minimization without Derivatives</i>, Prentice-Hall, 1973 (root finding).",
    "I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, Pure and pseudo-pure fluid thermophysical property "
    "evaluation and the open-source thermophysical property library CoolProp, <i>Ind. Eng. Chem. Res.</i> 53 "
    "(2014) 2498-2508 (properties: reference equations of state, HEOS backend).",
]


def _unit_of(key):
    from cycle.plots import axis_label

    label, _ = axis_label(key)
    return label.rsplit("[", 1)[1].rstrip("]") if "[" in label else ""


def _number(value):
    if value is None:
        return "-"
    if isinstance(value, float):
        return f"{value:.6g}"
    return html.escape(str(value))


def _table(headers, rows, text_columns=()):
    head = "".join(f"<th class='text'>{html.escape(h)}</th>" if k in text_columns else f"<th>{html.escape(h)}</th>"
                   for k, h in enumerate(headers))
    body = []
    for row in rows:
        cells = "".join(f"<td class='text'>{cell}</td>" if k in text_columns else f"<td>{cell}</td>"
                        for k, cell in enumerate(row))
        body.append(f"<tr>{cells}</tr>")
    return f"<table><thead><tr>{head}</tr></thead><tbody>{''.join(body)}</tbody></table>"


def _figure(png, caption):
    data = base64.b64encode(png).decode("ascii")
    return (f"<figure><img alt='{html.escape(caption)}' src='data:image/png;base64,{data}'>"
            f"<figcaption>{html.escape(caption)}</figcaption></figure>")


def build_report(result, scenario_text, when=None):
    """The report as one HTML string.

    Parameters
    ----------
    result : cycle.results.CycleResult
    scenario_text : str
        The scenario file as given (shown verbatim).
    when : datetime.date, optional
        Report date; default today.
    """
    from cycle import __version__
    from cycle.plots import exchanger_profiles, figure_png, loss_chart, ts_diagram

    sc = result.scenario
    when = when or datetime.date.today()
    summary = result.summary()
    parts = [f"<!DOCTYPE html><html lang='en'><head><meta charset='utf-8'>"
             f"<title>lhsim report: {html.escape(sc.name or sc.gas)}</title><style>{_CSS}</style></head><body>"]
    parts.append(f"<h1>{html.escape(sc.name or 'Linde-Hampson design point')}</h1>")
    parts.append(f"<p class='meta'>{html.escape(sc.gas)}, {sc.layout} cycle, {sc.low_pressure / 1e5:g} to "
                 f"{sc.high_pressure / 1e5:g} bar. Made by lhsim {__version__} on {when.isoformat()}.</p>")
    parts.append("<div class='caution'><b>Safety.</b> " + html.escape(CAUTIONS.replace("safety: ", "", 1))
                 .replace("\n", " ") + "</div>")

    parts.append("<h2>Summary</h2>")
    rows = [(html.escape(key), _number(value), html.escape(_unit_of(key))) for key, value in summary.items()]
    parts.append(_table(["quantity", "value", "unit"], rows, text_columns=(0, 2)))

    if result.warnings:
        parts.append("<h2>Warnings</h2>")
        parts += [f"<div class='warning'>{html.escape(w)}</div>" for w in result.warnings]

    parts.append("<h2>Figures</h2>")
    for draw, caption in ((ts_diagram, "The cycle on a T-s diagram; numbers are the streams of the state table."),
                          (exchanger_profiles, "Recuperator temperature profiles against cumulative duty."),
                          (loss_chart, "From ideal work to actual work: the exergy destroyed in each unit.")):
        fig, _ = draw(result)
        parts.append(_figure(figure_png(fig), caption))

    parts.append("<h2>Streams</h2>")
    state_rows = []
    for row in result.state_rows():
        state_rows.append([str(row["number"]), html.escape(row["stream"]), f"{row['temperature_K']:.2f}",
                           f"{row['pressure_bar']:.4g}", f"{row['enthalpy_kJ_per_kg']:.2f}",
                           f"{row['entropy_kJ_per_kg_K']:.4f}",
                           "" if row["quality"] is None else f"{row['quality']:.4f}", html.escape(row["phase"]),
                           f"{row['flow_per_kg_compressed']:.4f}",
                           f"{row['mass_flow_kg_per_h']:.3f}" if "mass_flow_kg_per_h" in row else "-"])
    parts.append(_table(["#", "stream", "T [K]", "p [bar]", "h [kJ/kg]", "s [kJ/(kg K)]", "quality [-]", "phase",
                         "flow [per kg compressed]", "flow [kg/h]"], state_rows, text_columns=(1, 7)))
    parts.append("<p class='meta'>Enthalpy and entropy on CoolProp's reference state for the gas.</p>")

    parts.append("<h2>Where the work goes (exergy)</h2>")
    total = result.work_per_kg_liquid
    ex_rows = [("ideal work of liquefaction", f"{result.ideal_work_per_kg_liquid / 1e3:.1f}",
                f"{100 * result.ideal_work_per_kg_liquid / total:.1f}")]
    ex_rows += [(html.escape(name.replace("_", " ")), f"{value / 1e3:.1f}", f"{100 * value / total:.1f}")
                for name, value in result.exergy_losses_per_kg_liquid().items()]
    ex_rows.append(("actual work", f"{total / 1e3:.1f}", "100.0"))
    parts.append(_table(["", "kJ/kg of liquid", "share [%]"], ex_rows, text_columns=(0,)))

    sol = result.solve
    parts.append("<h2>Method</h2>")
    parts.append(
        "<p>Real-gas properties come from CoolProp's reference equations of state. The unit operations "
        "(compressor, aftercooler, recuperators, precooler, valves, separator, make-up mixing) are wired by "
        "named streams. The recycle - the return flow depends on the yield, which depends on the recuperator - "
        "is torn at each recuperator's duty and converged with Brent's method on the recuperator's sizing "
        "equation (effectiveness, minimum approach over equal-duty zones, or UA as the sum of zone duty over zone "
        "LMTD). The heat leak is charged at the separator. The exergy destroyed in each unit is the ambient "
        "temperature times its entropy generation; the ideal work plus all losses equals the actual work. "
        f"This solve: {'converged' if sol.converged else 'NOT converged'} in {sol.iterations} iterations, "
        f"residual {sol.residual:.2e} {html.escape(sol.residual_unit)}; energy balance residual "
        f"{result.energy_balance_residual:.1e} of the compressor work.</p>")
    parts.append("<ol>" + "".join(f"<li>{ref}</li>" for ref in REFERENCES) + "</ol>")

    parts.append("<h2>Scenario as given</h2>")
    parts.append(f"<pre>{html.escape(scenario_text)}</pre>")
    parts.append("</body></html>")
    return "\n".join(parts)
