#!/usr/bin/env python3
"""Draws the sample review's numbers as one SVG picture (python3, standard library only).

Left: each mirror output's output resistance three ways (by inspection, linearised,
simulated) as bars on a logarithmic scale, so agreement shows as three bars of one
length and a disagreement as a step. Right: each transistor's saturation margin
(Vds - Vdsat, or Vce - Vce,sat), with the review's default 100 mV warning line; a bar
left of zero is a device out of saturation.

Regenerate (from the project folder, after the expected report changes):
    python3 samples/tamarack/draw_review.py samples/tamarack/expected/review.json samples/tamarack/review.svg
"""
import json
import math
import sys
from xml.sax.saxutils import escape

KINDS = [("inspection", "by inspection", "#3b6ea5"),
         ("linearised", "linearised", "#8fb8de"),
         ("simulated", "simulated", "#d9a441")]
SEVERITY_COLOUR = {"error": "#b23a2f", "warning": "#c77c11", "info": "#5d6d7e"}
FONT = 'font-family="DejaVu Sans, Verdana, sans-serif"'


def si(value, unit):
    """3 significant digits with an SI prefix, as the review prints them."""
    if value == 0:
        return f"0 {unit}"
    prefixes = [(1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "µ"), (1e-9, "n")]
    for scale, prefix in prefixes:
        if abs(value) >= scale:
            return f"{value / scale:.3g} {prefix}{unit}"
    return f"{value:.3g} {unit}"


def text(x, y, s, size=12, anchor="start", weight="normal", fill="#222"):
    return (f'<text x="{x:.1f}" y="{y:.1f}" {FONT} font-size="{size}" text-anchor="{anchor}" '
            f'font-weight="{weight}" fill="{fill}">{escape(s)}</text>')


def worst_severity(findings):
    order = ["error", "warning", "info"]
    severities = [f["severity"] for f in findings if f["severity"] in order]
    return min(severities, key=order.index) if severities else None


def resistance_panel(report, x0, y0, width):
    """Three log-scale bars per output; returns (svg parts, height)."""
    parts = []
    lo, hi = 1e3, 1e9  # 1 kΩ to 1 GΩ
    label_w, value_w = 190, 105
    bar_x, bar_w = x0 + label_w, width - label_w - value_w

    def xpos(r):
        r = min(max(r, lo), hi)
        return bar_x + bar_w * (math.log10(r) - math.log10(lo)) / (math.log10(hi) - math.log10(lo))

    parts.append(text(x0, y0, "Output resistance, three ways", 15, weight="bold"))
    y = y0 + 26
    for i, (_, label, colour) in enumerate(KINDS):
        lx = bar_x + i * 125
        parts.append(f'<rect x="{lx}" y="{y - 9}" width="12" height="10" fill="{colour}"/>')
        parts.append(text(lx + 17, y, label, 11))
    y += 18
    axis_top = y
    rows = [(m, o) for m in report["mirrors"] for o in m["outputs"]]
    row_h = 44
    for m, o in rows:
        rout = o["rout"]
        severity = worst_severity(o["findings"])
        name_colour = SEVERITY_COLOUR.get(severity, "#222") if severity in ("error", "warning") else "#222"
        parts.append(text(x0, y + 15, o["node"], 13, weight="bold", fill=name_colour))
        parts.append(text(x0, y + 30, m["family"], 10, fill="#555"))
        for k, (key, _, colour) in enumerate(KINDS):
            value = rout.get(key)
            by = y + 4 + k * 12
            if value is None:
                parts.append(text(bar_x + 4, by + 9, "not available", 9, fill="#777"))
                continue
            parts.append(f'<rect x="{bar_x:.1f}" y="{by}" width="{xpos(value) - bar_x:.1f}" height="10" '
                         f'fill="{colour}"><title>{escape(key)}: {escape(si(value, "Ω"))}</title></rect>')
        shown = rout.get("simulated") or rout.get("linearised") or rout.get("inspection")
        if shown:
            parts.append(text(bar_x + bar_w + 6, y + 20, si(shown, "Ω"), 11))
        errors = [f["code"] for f in o["findings"] if f["severity"] == "error"]
        disagree = [c["pair"] for c in rout.get("comparisons", []) if not c.get("agrees", True)]
        if errors:  # three values may agree on a resistance that has collapsed
            parts.append(text(bar_x + bar_w + 6, y + 34, errors[0], 10, fill=SEVERITY_COLOUR["error"]))
        elif disagree:
            parts.append(text(bar_x + bar_w + 6, y + 34, "values disagree", 10, fill=SEVERITY_COLOUR["warning"]))
        elif severity == "warning":
            code = next(f["code"] for f in o["findings"] if f["severity"] == "warning")
            parts.append(text(bar_x + bar_w + 6, y + 34, code, 10, fill=SEVERITY_COLOUR["warning"]))
        y += row_h
    # decades
    for e in range(3, 10):
        gx = xpos(10.0 ** e)
        parts.append(f'<line x1="{gx:.1f}" y1="{axis_top - 4}" x2="{gx:.1f}" y2="{y}" stroke="#ccc" '
                     f'stroke-dasharray="2,3"/>')
        parts.append(text(gx, y + 14, si(10.0 ** e, "Ω"), 10, "middle", fill="#555"))
    return parts, y + 24 - y0


def margin_panel(report, x0, y0, width, warn=0.1):
    """One bar per transistor: its saturation margin in volts; returns (svg parts, height)."""
    parts = []
    lo, hi = -0.25, 2.25
    label_w = 60
    bar_x, bar_w = x0 + label_w, width - label_w - 10

    def xpos(v):
        v = min(max(v, lo), hi)
        return bar_x + bar_w * (v - lo) / (hi - lo)

    parts.append(text(x0, y0, "Saturation margin per transistor", 15, weight="bold"))
    parts.append(text(x0, y0 + 26, "Vds − Vdsat (MOS), Vce − Vce,sat (bipolar)", 11, fill="#555"))
    y = y0 + 44
    axis_top = y
    row_h = 17
    for d in report["devices"]:
        margin = d.get("margin")
        if margin is None:
            continue
        if margin < 0:
            colour = SEVERITY_COLOUR["error"]
        elif margin < warn:
            colour = SEVERITY_COLOUR["warning"]
        else:
            colour = "#4f8a5b"
        parts.append(text(x0, y + 11, d.get("designer_name", d["name"]), 11))
        left, right = sorted((xpos(0.0), xpos(margin)))
        parts.append(f'<rect x="{left:.1f}" y="{y + 2}" width="{max(right - left, 1):.1f}" height="11" '
                     f'fill="{colour}"><title>{escape(d["name"])} {escape(d["region"])}: margin '
                     f'{escape(si(margin, "V"))}</title></rect>')
        if margin < 0:
            parts.append(text(right + 4, y + 11, f'{d["region"]}, {si(margin, "V")}', 10,
                              fill=SEVERITY_COLOUR["error"]))
        y += row_h
    for v in (0.0, 0.5, 1.0, 1.5, 2.0):
        gx = xpos(v)
        dash = "" if v == 0 else ' stroke-dasharray="2,3"'
        parts.append(f'<line x1="{gx:.1f}" y1="{axis_top}" x2="{gx:.1f}" y2="{y}" stroke="#bbb"{dash}/>')
        parts.append(text(gx, y + 14, f"{v:g} V", 10, "middle", fill="#555"))
    gx = xpos(warn)
    parts.append(f'<line x1="{gx:.1f}" y1="{axis_top - 4}" x2="{gx:.1f}" y2="{y}" '
                 f'stroke="{SEVERITY_COLOUR["warning"]}" stroke-width="1.5"/>')
    parts.append(text(gx + 3, axis_top - 6, "100 mV", 10, fill=SEVERITY_COLOUR["warning"]))
    return parts, y + 24 - y0


def draw(report):
    width, pad = 1000, 24
    left_w = 600
    left, left_h = resistance_panel(report, pad, pad + 16, left_w - pad)
    right, right_h = margin_panel(report, left_w + 2 * pad, pad + 16, width - left_w - 3 * pad)
    s = report["summary"]
    footer_y = pad + 16 + max(left_h, right_h) + 10
    footer = (f'{s["mirrors"]} mirrors: {s["errors"]} error, {s["warnings"]} warnings, {s["infos"]} info '
              f'(mirrorcheck review of {report["inputs"]["netlist"]})')
    height = footer_y + 14
    return "\n".join(
        [f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
         f'viewBox="0 0 {width} {height}">',
         f'<rect width="{width}" height="{height}" fill="#fcfcfa"/>'] + left + right +
        [text(pad, footer_y, footer, 11, fill="#555"), "</svg>", ""])


def main(argv):
    if len(argv) != 3:
        sys.stderr.write("usage: draw_review.py REPORT.json OUT.svg\n")
        return 2
    with open(argv[1], encoding="utf-8") as f:
        report = json.load(f)
    with open(argv[2], "w", encoding="utf-8") as f:
        f.write(draw(report))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
