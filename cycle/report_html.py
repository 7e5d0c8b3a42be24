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


def _margins_section(frame, stats):
    """The uncertainty section's results: statistics, the production margin, the sensitivity
    table and the chart."""
    from cycle.plots import figure_png, uncertainty_chart
    from cycle.report import number
    from cycle.uncertainty import OUTPUTS, SENSITIVITY_COLUMNS, margin_sentences, ranked_sensitivity

    words = {k: (w, u) for k, w, u in OUTPUTS}
    parts = ["<h2>Margins</h2>",
             f"<p>{stats['samples']} samples of the uncertain inputs (a seeded Latin hypercube), each a design point: "
             f"{stats['solved']} solved, {stats['no_liquid']} made no liquid, {stats['failed']} failed.</p>"]
    parts.append(_table(["input", "distribution"], [(html.escape(k), html.escape(v)) for k, v in stats["inputs"].items()],
                        text_columns=(0, 1)))
    rows = [(html.escape(words[k][0]), number(s["mean"], "{:.5g}"), number(s["sd"], "{:.3g}"), number(s["p5"], "{:.5g}"),
             number(s["p50"], "{:.5g}"), number(s["p95"], "{:.5g}"), html.escape(words[k][1]))
            for k, s in stats["outputs"].items()]
    parts.append(_table(["output", "mean", "sd", "P5", "P50", "P95", "unit"], rows, text_columns=(0, 6)))
    parts += [f"<p>{html.escape(m[0].upper() + m[1:])}.</p>" for m in margin_sentences(stats)]
    keys = [k for k in stats["outputs"] if k in SENSITIVITY_COLUMNS]
    main, ranked, noise = ranked_sensitivity(stats)
    parts.append(f"<p class='meta'>What drives the spread: {html.escape(stats['sensitivity_method'])} of each input "
                 f"with each output, largest first for {html.escape(words[main][0])}; with {stats['solved']} samples "
                 f"a |rho| below about {noise:.2f} cannot be told from no effect.</p>")
    parts.append(_table(["input"] + [SENSITIVITY_COLUMNS[k] for k in keys],
                        [[html.escape(name)] + [number(row.get(k, 0.0), "{:+.3f}") for k in keys]
                         for name, row in ranked], text_columns=(0,)))
    parts += [f"<div class='warning'>{html.escape(n)}</div>" for n in stats["notes"]]
    fig, _ = uncertainty_chart(frame, stats)
    parts.append(_figure(figure_png(fig), "The main output over the samples, and what drives its spread."))
    return parts


def build_report(result, scenario_text, when=None, margins=None):
    """The report as one HTML string.

    Parameters
    ----------
    result : cycle.results.CycleResult
    scenario_text : str
        The scenario file as given (shown verbatim).
    when : datetime.date, optional
        Report date; default today.
    margins : (pandas.DataFrame, dict), optional
        The samples and statistics of the scenario's uncertainty section
        (:func:`cycle.uncertainty.run_uncertainty`): a section "Margins".
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

    from cycle.report import (exergy_rows, number, solve_lines, stage_table, state_cells, state_columns,
                              summary_sections)

    parts.append("<h2>Summary</h2>")
    for title, rows in summary_sections(result):
        parts.append(f"<h3>{html.escape(title)}</h3>")
        parts.append(_table(["quantity", "value", "unit"],
                            [(html.escape(label.strip()), html.escape(value), html.escape(unit))
                             for label, value, unit in rows], text_columns=(0, 2)))
        if title == "Compressor":
            headings, cells, notes = stage_table(result)
            parts.append("<h3>Compressor stages</h3>")
            parts.append(_table(headings, [[html.escape(c) for c in row] for row in cells],
                                text_columns=(0,) if headings[0] == "section" else ()))
            parts += [f"<p class='meta'>{html.escape(note)}</p>" for note in notes]

    if result.warnings:
        parts.append("<h2>Warnings</h2>")
        parts += [f"<div class='warning'>{html.escape(w)}</div>" for w in result.warnings]

    parts.append("<h2>Figures</h2>")
    for draw, caption in ((ts_diagram, "The cycle on a T-s diagram; numbers are the streams of the state table."),
                          (exchanger_profiles, "Recuperator temperature profiles against cumulative duty."),
                          (loss_chart, "From ideal work to actual work: the exergy destroyed in each unit.")):
        fig, _ = draw(result)
        parts.append(_figure(figure_png(fig), caption))

    if margins is not None:
        parts += _margins_section(*margins)

    parts.append("<h2>Streams</h2>")
    states = result.state_rows()
    columns = state_columns(states)
    state_rows = [[str(row["number"]), html.escape(row["stream"]), html.escape(row["phase"])]
                  + [html.escape(c) for c in state_cells(row, columns)] for row in states]
    parts.append(_table(["#", "stream", "phase"] + [h for h, _, _ in columns], state_rows, text_columns=(1, 2)))
    parts.append("<p class='meta'>Flow [-] is per kg of compressor flow. Enthalpy and entropy on CoolProp's "
                 "reference state for the gas.</p>")

    parts.append("<h2>Where the work goes (exergy, per kg of liquid)</h2>")
    parts.append(_table(["", "kJ/kg", "share [%]"],
                        [(html.escape(label), number(value, "{:.1f}"), number(share, "{:.1f}"))
                         for label, value, share in exergy_rows(result)], text_columns=(0,)))

    parts.append("<h2>Method</h2>")
    parts.append(
        "<p>Real-gas properties come from CoolProp's reference equations of state. The unit operations "
        "(compressor, aftercooler, recuperators, precooler, valves, separator, make-up mixing) are wired by "
        "named streams. The recycle - the return flow depends on the yield, which depends on the recuperator - "
        "is torn at each recuperator's duty and converged with Brent's method on the recuperator's sizing "
        "equation (effectiveness, minimum approach over equal-duty zones, or UA as the sum of zone duty over zone "
        "LMTD). The heat leak is charged at the separator. The exergy destroyed in each unit is the ambient "
        "temperature times its entropy generation; the ideal work plus all losses equals the actual work. "
        "This solve:</p><ul>" + "".join(f"<li>{html.escape(line)}</li>" for line in solve_lines(result)) + "</ul>")
    parts.append("<ol>" + "".join(f"<li>{ref}</li>" for ref in REFERENCES) + "</ol>")

    parts.append("<h2>Scenario as given</h2>")
    parts.append(f"<pre>{html.escape(scenario_text)}</pre>")
    parts.append("</body></html>")
    return "\n".join(parts)
