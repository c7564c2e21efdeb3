# Writes the recognition test decks (NMOS and NPN forms and their PMOS and PNP mirror images)
# into this folder: python3 generate_decks.py. Hand-written decks here are not generated.
import os
OUT = os.path.dirname(os.path.abspath(__file__))
MODELS = {
 'nmos': '.model nch nmos (level=1 vto=0.5 kp=200u lambda=0.05 gamma=0.4 phi=0.7)',
 'pmos': '.model pch pmos (level=1 vto=-0.5 kp=80u lambda=0.05 gamma=0.4 phi=0.7)',
 'npn': '.model qn npn (is=1e-16 bf=100 vaf=50)',
 'pnp': '.model qp pnp (is=1e-16 bf=50 vaf=30)',
}
MODEL_NAME = {'nmos': 'nch', 'pmos': 'pch', 'npn': 'qn', 'pnp': 'qp'}

class K:
    def __init__(self, kind):
        self.kind = kind
        self.mos = kind in ('nmos', 'pmos')
        self.n = kind in ('nmos', 'npn')
        self.supply = 3.3 if self.mos else 5.0
        self.top = 'vdd' if self.n else '0'
        self.rail = '0' if self.n else 'vdd'
        self.lines = []
    def t(self, name, d, g, s, size=1):
        if self.mos:
            self.lines.append(f"m{name} {d} {g} {s} {self.rail} {MODEL_NAME[self.kind]} w={10*size:g}u l=1u")
        else:
            self.lines.append(f"q{name} {d} {g} {s} {MODEL_NAME[self.kind]} {size:g}")
    def isrc(self, name, net, val):
        a, b = (self.top, net) if self.n else (net, self.top)
        self.lines.append(f"{name} {a} {b} {val}")
    def vfrom_rail(self, name, net, v):
        volts = v if self.n else self.supply - v
        self.lines.append(f"{name} {net} 0 dc {volts:g}")
    def hold(self, name, net):
        self.vfrom_rail(name, net, 2.0 if self.mos else 3.0)
    def r(self, name, a, b, val):
        self.lines.append(f"r{name} {a} {b} {val}")
    def text(self, title):
        head = [f"* {title}", MODELS[self.kind], f"vdd vdd 0 dc {self.supply:g}"]
        tail = [".control", "op", "print all", "quit 0", ".endc", ".end"]
        return "\n".join(head + self.lines + tail) + "\n"

def simple(k):
    R = k.rail
    k.t(1, 'ref', 'ref', R, 1); k.t(2, 'out1', 'ref', R, 2); k.t(3, 'out2', 'ref', R, 4)
    k.isrc('iref', 'ref', '20u'); k.hold('vout1', 'out1'); k.hold('vout2', 'out2')
    return "simple mirror, two outputs of ratio 2 and 4"

def degenerated(k):
    R = k.rail
    k.t(1, 'ref', 'ref', 's1'); k.r(1, 's1', R, '5k'); k.t(2, 'out', 'ref', 's2', 2); k.r(2, 's2', R, '2.5k')
    k.isrc('iref', 'ref', '20u'); k.hold('vout', 'out')
    return "source/emitter-degenerated mirror of ratio 2"

def widlar(k):
    R = k.rail
    k.t(1, 'ref', 'ref', R); k.t(2, 'out', 'ref', 's2'); k.r(2, 's2', R, '5k')
    k.isrc('iref', 'ref', '50u'); k.hold('vout', 'out')
    return "Widlar mirror: resistor on the output side only"

def cascode(k):
    R = k.rail
    k.t(1, 'g1', 'g1', R); k.t(3, 'ref', 'ref', 'g1'); k.t(2, 'mid', 'g1', R); k.t(4, 'out', 'ref', 'mid')
    k.isrc('iref', 'ref', '20u'); k.hold('vout', 'out')
    return "standard cascode mirror: stacked diode reference"

def wide_swing(k):
    R = k.rail
    k.t(1, 'x', 'ref', R); k.t(3, 'ref', 'vb', 'x'); k.t(2, 'mid', 'ref', R); k.t(4, 'out', 'vb', 'mid')
    k.isrc('iref', 'ref', '20u'); k.hold('vout', 'out')
    if k.mos:
        k.t(5, 'vb', 'vb', R, 0.15); k.isrc('ib', 'vb', '20u')
    else:
        k.vfrom_rail('vb', 'vb', 1.0)
    return "wide-swing cascode mirror: cascode gates from a separate bias"

def wide_swing_diode(k):
    R = k.rail
    k.t(1, 'g', 'g', R); k.t(3, 'ref', 'vb', 'g'); k.t(2, 'mid', 'g', R); k.t(4, 'out', 'vb', 'mid')
    # A resistor, not an ideal current source, feeds the reference: the cascode's drain is a
    # high-impedance node that an ideal source would push out of range.
    k.r('ref', k.top, 'ref', '100k' if k.mos else '200k'); k.hold('vout', 'out')
    k.vfrom_rail('vb', 'vb', {'nmos': 1.4, 'pmos': 1.6, 'npn': 1.3, 'pnp': 1.3}[k.kind])
    return "low-voltage cascode mirror: diode reference under a cascode, gates from a bias source"

def wilson(k):
    R = k.rail
    k.t(2, 'g', 'g', R); k.t(1, 'y', 'g', R); k.t(3, 'out', 'y', 'g')
    k.isrc('iref', 'y', '20u'); k.hold('vout', 'out')
    return "Wilson mirror: input device 1, output diode 2, output device 3"

def improved_wilson(k):
    R = k.rail
    k.t(2, 'g', 'g', R); k.t(1, 'x', 'g', R); k.t(4, 'y', 'y', 'x'); k.t(3, 'out', 'y', 'g')
    k.isrc('iref', 'y', '20u'); k.hold('vout', 'out')
    return "improved Wilson mirror: diode 4 on the input device balances its drain voltage"

def regulated_cascode(k):
    R = k.rail
    k.t(1, 'ref', 'ref', R); k.t(2, 's', 'ref', R); k.t(4, 'out', 'a', 's'); k.t(5, 'a', 's', R)
    k.isrc('iref', 'ref', '20u'); k.isrc('ib', 'a', '5u'); k.hold('vout', 'out')
    return "regulated cascode mirror: device 5 boosts the cascode's gate"

def beta_helper(k):
    R = k.rail
    k.t(1, 'x', 'g', R); k.t(6, k.top, 'x', 'g'); k.r('g', 'g', R, '50k'); k.t(2, 'out', 'g', R, 2)
    k.isrc('iref', 'x', '20u'); k.hold('vout', 'out')
    return "mirror with a beta helper: follower 6 drives the gates from the reference"

def stack(k):
    R = k.rail
    k.t(1, 'mid', 'vb1', R); k.t(2, 'out', 'vb2', 'mid')
    k.vfrom_rail('vb1', 'vb1', 0.65 if k.mos else 0.62); k.vfrom_rail('vb2', 'vb2', 1.4)
    k.hold('vout', 'out')
    return "cascoded current source biased by voltage sources: a stack, no mirror"

FAMILIES = [simple, degenerated, widlar, cascode, wide_swing, wide_swing_diode, wilson, improved_wilson, regulated_cascode,
            beta_helper, stack]
for kind in MODELS:
    for fam in FAMILIES:
        k = K(kind)
        title = fam(k)
        with open(os.path.join(OUT, f"{kind}_{fam.__name__}.cir"), 'w') as f:
            f.write(k.text(f"{kind}: {title}"))
