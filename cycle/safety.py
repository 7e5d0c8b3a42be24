"""The safety cautions every view of lhsim carries (command line, text output, HTML report).

Plain text, no imports: the lowest layer that the views share.
"""

CAUTIONS = """\
safety: lhsim is a design aid, not a safety assessment. Liquefiers work with gas at high
pressure (stored energy; rated piping, relief valves), with cryogenic liquid (cold burns,
embrittlement, pressure rise as trapped liquid warms), with oxygen deficiency from nitrogen,
argon or helium released indoors and oxygen enrichment where air or oxygen condenses, and
with flammable gases (hydrogen, methane). Follow local codes, the gas supplier's safety data
and licensed engineering practice; have every design checked by a qualified person."""

SHORT_CAUTION = ("Caution: high pressure, cryogenic liquid, oxygen deficiency or enrichment, flammable gases.\n"
                 "Design aid only; follow local codes and licensed practice (lhsim --help).")
