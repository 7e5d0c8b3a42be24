"""Draw the three lhsim cycle layouts as SVG block diagrams into docs/img/.

Run from the repository root:  python docs/draw_layouts.py

The drawings are our own: plain boxes for units, warm high-pressure lines in orange, cold
return lines in blue, liquid in green (the Okabe-Ito colour-blind-safe palette).  Stream
numbers match the state table of ``lhsim run`` for the simplest compressor (one stage or
isothermal); intercooler states add rows after the compressor's.
"""

import pathlib

HOT, COLD, LIQUID, INK, FILL = "#D55E00", "#0072B2", "#009E73", "#222222", "#F4F4F4"
FONT = "font-family='DejaVu Sans, Arial, sans-serif'"


class Drawing:
    def __init__(self, width, height, title):
        self.width, self.height = width, height
        self.parts = [f"<rect width='{width}' height='{height}' fill='white'/>",
                      f"<text x='{width / 2}' y='24' text-anchor='middle' font-size='16' font-weight='bold' "
                      f"{FONT} fill='{INK}'>{title}</text>"]

    def box(self, x, y, w, h, label, sub=""):
        self.parts.append(f"<rect x='{x}' y='{y}' width='{w}' height='{h}' rx='6' fill='{FILL}' "
                          f"stroke='{INK}' stroke-width='1.5'/>")
        cy = y + h / 2 + (0 if sub else 5)
        self.parts.append(f"<text x='{x + w / 2}' y='{cy}' text-anchor='middle' font-size='13' {FONT} "
                          f"fill='{INK}'>{label}</text>")
        if sub:
            self.parts.append(f"<text x='{x + w / 2}' y='{cy + 16}' text-anchor='middle' font-size='11' "
                              f"{FONT} fill='#555555'>{sub}</text>")

    def valve(self, x, y, label):
        """A throttle valve drawn as two triangles tip to tip, centred at (x, y), flow downwards."""
        s = 11
        self.parts.append(f"<polygon points='{x - s},{y - s} {x + s},{y - s} {x},{y} {x - s},{y + s} "
                          f"{x + s},{y + s} {x},{y}' fill='white' stroke='{INK}' stroke-width='1.5'/>")
        self.parts.append(f"<text x='{x - s - 6}' y='{y + 4}' text-anchor='end' font-size='12' {FONT} "
                          f"fill='{INK}'>{label}</text>")

    def line(self, points, colour, number=None, at=0, offset=(8, -6)):
        path = " ".join(f"{px},{py}" for px, py in points)
        self.parts.append(f"<polyline points='{path}' fill='none' stroke='{colour}' stroke-width='2.5' "
                          f"marker-end='url(#head-{colour[1:]})'/>")
        if number is not None:
            (x0, y0), (x1, y1) = points[at], points[at + 1]
            mx, my = (x0 + x1) / 2 + offset[0], (y0 + y1) / 2 + offset[1]
            self.parts.append(f"<circle cx='{mx}' cy='{my}' r='10' fill='white' stroke='{colour}' stroke-width='1.5'/>")
            self.parts.append(f"<text x='{mx}' y='{my + 4}' text-anchor='middle' font-size='11' {FONT} "
                              f"fill='{colour}'>{number}</text>")

    def note(self, x, y, text, anchor="start", colour=INK):
        self.parts.append(f"<text x='{x}' y='{y}' text-anchor='{anchor}' font-size='12' {FONT} "
                          f"fill='{colour}'>{text}</text>")

    def svg(self):
        heads = "".join(
            f"<marker id='head-{c[1:]}' markerWidth='10' markerHeight='8' refX='9' refY='4' orient='auto' "
            f"markerUnits='userSpaceOnUse'>"
            f"<polygon points='0,0 10,4 0,8' fill='{c}'/></marker>" for c in (HOT, COLD, LIQUID))
        return (f"<svg xmlns='http://www.w3.org/2000/svg' width='{self.width}' height='{self.height}' "
                f"viewBox='0 0 {self.width} {self.height}'><defs>{heads}</defs>{''.join(self.parts)}</svg>\n")


def simple():
    d = Drawing(420, 600, "Simple Linde-Hampson cycle")
    d.box(90, 50, 130, 50, "compressor", "work in")
    d.box(90, 140, 130, 44, "aftercooler", "heat out")
    d.box(90, 225, 230, 150, "recuperator", "high-pressure down, return up")
    d.box(90, 470, 130, 60, "separator", "heat leak in")
    d.line([(155, 100), (155, 140)], HOT, 2)
    d.line([(155, 184), (155, 225)], HOT, 3)
    d.line([(155, 375), (155, 408)], HOT, 4, offset=(-22, 0))
    d.valve(155, 420, "valve")
    d.line([(155, 432), (155, 470)], COLD, 5, offset=(-22, 0))
    d.line([(155, 530), (155, 575)], LIQUID, 6)
    d.note(165, 590, "liquid product", colour=LIQUID)
    d.line([(220, 500), (280, 500), (280, 375)], COLD, 7, at=1, offset=(14, 0))
    d.line([(280, 225), (280, 75), (236, 75)], COLD, 8, at=0, offset=(14, 0))
    d.line([(360, 75), (320, 75), (296, 75)], COLD)
    d.note(364, 70, "make-up", colour=INK)
    d.note(364, 84, "gas 9", colour=INK)
    d.line([(236, 75), (220, 75)], COLD, 1, offset=(-4, -16))
    return d


def precooled():
    d = Drawing(460, 780, "Precooled Linde-Hampson cycle")
    d.box(90, 50, 130, 50, "compressor", "work in")
    d.box(90, 140, 130, 44, "aftercooler", "heat out")
    d.box(90, 225, 250, 120, "warm recuperator")
    d.box(90, 385, 130, 54, "precooler", "bath or refrigerator")
    d.box(90, 480, 250, 120, "cold recuperator")
    d.box(90, 660, 130, 56, "separator", "heat leak in")
    d.line([(155, 100), (155, 140)], HOT, 2)
    d.line([(155, 184), (155, 225)], HOT, 3)
    d.line([(155, 345), (155, 385)], HOT, 4)
    d.line([(155, 439), (155, 480)], HOT, 5)
    d.line([(155, 600), (155, 616)], HOT, 6, offset=(-22, 0))
    d.valve(155, 628, "valve")
    d.line([(155, 640), (155, 660)], COLD, 7, offset=(-22, 0))
    d.line([(155, 716), (155, 760)], LIQUID, 8)
    d.note(165, 772, "liquid product", colour=LIQUID)
    d.line([(220, 688), (300, 688), (300, 600)], COLD, 9, at=1, offset=(14, 0))
    d.line([(300, 480), (300, 345)], COLD, 10, offset=(14, 0))
    d.line([(300, 225), (300, 75), (236, 75)], COLD, 11, offset=(14, 0))
    d.line([(390, 75), (316, 75)], COLD)
    d.note(394, 70, "make-up")
    d.note(394, 84, "gas 12")
    d.line([(236, 75), (220, 75)], COLD, 1, offset=(-4, -16))
    return d


def dual_pressure():
    d = Drawing(520, 680, "Dual-pressure Linde-Hampson cycle")
    d.box(40, 50, 120, 50, "low-pressure", "compressor section")
    d.box(210, 50, 120, 50, "high-pressure", "compressor section")
    d.box(210, 135, 120, 44, "aftercooler", "heat out")
    d.box(170, 215, 300, 140, "recuperator", "one hot and two cold streams")
    d.box(210, 560, 120, 56, "separator", "heat leak in")
    d.line([(160, 75), (210, 75)], HOT, 2, offset=(0, -16))
    d.line([(270, 100), (270, 135)], HOT, 4)
    d.line([(270, 179), (270, 215)], HOT, 5)
    d.line([(270, 355), (270, 388)], HOT, 6, offset=(-22, 0))
    d.valve(270, 400, "first valve")
    d.line([(270, 412), (270, 470), (270, 488)], COLD, 7, offset=(-22, 0))
    d.note(282, 462, "i returns,")
    d.note(282, 476, "1 - i goes on")
    d.valve(270, 500, "second valve")
    d.line([(270, 512), (270, 560)], COLD, 8, offset=(-22, 0))
    d.line([(270, 616), (270, 660)], LIQUID, 9)
    d.note(280, 670, "liquid product", colour=LIQUID)
    d.line([(330, 588), (420, 588), (420, 355)], COLD, 10, at=1, offset=(14, 0))
    d.line([(270, 440), (360, 440), (360, 355)], COLD)
    d.line([(420, 215), (420, 30), (100, 30), (100, 50)], COLD, 11, at=0, offset=(14, 0))
    d.line([(360, 215), (360, 120), (300, 120), (300, 100)], COLD, 12, at=0, offset=(14, 0))
    d.line([(20, 75), (40, 75)], COLD)
    d.note(20, 122, "make-up gas 13")
    d.note(20, 136, "joins at suction 1")
    d.note(172, 130, "2 and 12 mix", colour=INK)
    d.note(172, 144, "into 3", colour=INK)
    return d


def main(out="docs/img"):
    folder = pathlib.Path(out)
    folder.mkdir(parents=True, exist_ok=True)
    for name, draw in (("layout-simple", simple), ("layout-precooled", precooled),
                       ("layout-dual-pressure", dual_pressure)):
        (folder / f"{name}.svg").write_text(draw().svg(), encoding="utf-8")
        print(f"wrote {folder / name}.svg")


if __name__ == "__main__":
    main()
