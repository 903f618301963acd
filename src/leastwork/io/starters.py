"""Commented starter case files, one per common kind of statically indeterminate structure.

Each starter is a complete, valid case file (see docs/case-format.md) describing a small
scenario with realistic values, with comments on every table saying what it holds and how
to adapt it. ``leastwork new KIND`` prints one; ``leastwork new --list`` lists the kinds.

>>> "propped-beam" in starter_kinds()
True
>>> starter_text("tied-beam").startswith("#")
True
"""

from __future__ import annotations

import difflib

from ..errors import CaseError
from .starter_texts import BRACED_BAY_TENSION_ONLY, US_PROPPED_BEAM

__all__ = ["STARTERS", "starter_text", "starter_kinds"]

_PROPPED_BEAM = """\
# Plant-platform beam, built into a concrete wall at one end, resting on a bracket at the other.
#
# Structure : a 5.2 m steel beam (rolled I-section about 256 mm deep) carries the grating
#             of a pump platform. At A it is cast into a reinforced-concrete wall (fixed);
#             at B it rests on a steel bracket bolted to a second wall (a roller: it takes
#             vertical force only, the beam may slide and turn there).
# Loads     : case "service": grating, handrail and access load on a 1.5 m strip, plus one
#             leg of a pump skid; case "bracket-drop": the bracket at B sags 4 mm (an imposed
#             settlement), nothing else.
# Degree    : 1 (0 internal) - fixed 3 + roller 1 = 4 reactions, 3 equations of statics.
# Try       : leastwork solve propped-beam.toml --steps
#             leastwork solve propped-beam.toml --case bracket-drop
#             leastwork solve propped-beam.toml --redundants A.rz --json
#
# To adapt it: change the [parameters] (span, loads), the section values, and the loads.
# Any line starting with "#" is a comment and can be deleted.

# [structure]: a name printed on every result, and the units of bare numbers in the file
# (force and length) and of every number in the output: displacement and moment name
# their own output units (deflections in mm, moments in kN*m). Strings with their own
# units ("12 kN") are converted.
[structure]
name = "Pump-platform beam, fixed in a wall, on a bracket"
units = { force = "kN", length = "m", displacement = "mm", moment = "kN*m" }

# [parameters]: named values used below as "L", "w"... Change them here once.
[parameters]
L = "5.2 m"          # clear span, wall face to bracket
w = "8.0 kN/m"       # 1.0 kN/m^2 grating and services + 4.0 kN/m^2 access, x 1.5 m, + self-weight
P = "12 kN"          # one leg of the pump skid
a = "3.2 m"          # position of the skid leg, measured from the wall (from A)

# [materials.NAME]: E (and G for shear energy, alpha for temperature). Add more materials
# under other names and pick them per member with material = "NAME".
[materials.steel]
E = "210 GPa"

# [sections.NAME]: A (axial stiffness), I (bending stiffness), depth (temperature gradient).
# Put your section's values here, or give EI = "..." directly on the member.
[sections.ib256]
A = "4720 mm^2"
I = "5.54e7 mm^4"
depth = "256 mm"

# [defaults]: the material and section of every member that does not name its own.
[defaults]
material = "steel"
section = "ib256"

# [nodes]: x to the right, y up. Every support, load point you want as a node, and member
# end is a node. Names are letters, digits and underscores.
[nodes]
A = [0, 0]           # wall (fixed end)
B = ["L", 0]         # bracket

# [beams]: flexural members, one straight member per pair of nodes; "nodes" gives the
# start and the end (local x runs from start to end, so sagging moments are positive here).
[beams]
AB = { nodes = ["A", "B"] }

# [supports]: "fixed" (x, y, rz), "pinned" (x, y), "roller" (y only), or a table such as
# { restrain = ["x", "y"] } or { springs = { y = "8000 kN/m" } } for an elastic support.
[supports]
A = "fixed"
B = "roller"

# [[loads]]: one block per load. "case" groups loads into load cases (omit it for a single
# case called "default"). wy < 0 acts downwards; "at", "from", "to" are measured from the
# member's start node.
[[loads]]
case = "service"
member = "AB"
wy = "-w"

[[loads]]
case = "service"
member = "AB"
at = "a"
fy = "-P"

# A settlement moves a rigid support by a given amount (dy < 0: downwards). It needs no
# load: the beam is bent by being forced to follow the support.
[[loads]]
case = "bracket-drop"
settlement = "B"
dy = "-4 mm"

# [analysis]: the redundants (as many as the degree; remove the line to let the tool
# choose) and the displacements to report (NODE.x/y/rz, MEMBER@DISTANCE.y, NODE1-NODE2).
[analysis]
redundants = ["B.y"]
displacements = ["AB@2.6.y", "B.rz"]
"""

_CONTINUOUS_BEAM = """\
# Crane-runway girder of a workshop, continuous over three equal bays.
#
# Structure : a steel runway girder (rolled I-section about 355 mm deep) carries the rail
#             of a 5 t overhead travelling crane along one side of a workshop. It runs
#             A-B-C-D over four column brackets at 6.0 m centres. A is the bracket that
#             also takes the longitudinal braking force (pinned); B, C and D carry
#             vertical force only (rollers).
# Loads     : case "dead": girder, rail and fixings as a uniform load; case "crane": the two
#             wheels of the end carriage, 3.0 m apart, centred in the middle bay, each with
#             a vertical load and a longitudinal braking force along the rail.
# Degree    : 2 (0 internal) - pinned 2 + three rollers = 5 reactions, 3 equations.
# Try       : leastwork check continuous-beam.toml
#             leastwork solve continuous-beam.toml --case crane --steps
#             leastwork solve continuous-beam.toml --redundants AB.end.m,BC.end.m --json
#
# To adapt it: add or remove bays by adding nodes (E = ["4*L", 0]), a member per bay
# (DE = { nodes = ["D", "E"] }) and a support per node; every extra support adds one to the
# degree. Unequal bays: give each node its own x.

# name printed on the results; units of bare numbers (force, length) and of the output
[structure]
name = "Crane-runway girder over three 6 m bays"
units = { force = "kN", length = "m", displacement = "mm", moment = "kN*m" }

# bay length; node positions below are written with it
[parameters]
L = "6.0 m"

# E of the girder (add alpha for a temperature case, G for shear energy)
[materials.steel]
E = "210 GPa"

# A and I of the girder section (depth is only needed for a temperature gradient)
[sections.ib355]
A = "6490 mm^2"
I = "1.41e8 mm^4"
depth = "355 mm"

# every member without its own material/section uses these
[defaults]
material = "steel"
section = "ib355"

# one node per support (x to the right, y up); add a node wherever you want a result
[nodes]
A = [0, 0]
B = ["L", 0]
C = ["2*L", 0]
D = ["3*L", 0]

# one member per bay; the members are rigidly joined at B and C (the girder is continuous)
[beams]
AB = { nodes = ["A", "B"] }
BC = { nodes = ["B", "C"] }
CD = { nodes = ["C", "D"] }

# "pinned" holds x and y, "roller" holds y only; a settling column bracket can be
# modelled as a spring: C = { springs = { y = "20000 kN/m" } }
[supports]
A = "pinned"
B = "roller"
C = "roller"
D = "roller"

# ---- dead: girder, rail and clips, about 0.9 kN/m, plus walkway brackets ----
[[loads]]
case = "dead"
member = "AB"
wy = "-1.2 kN/m"

[[loads]]
case = "dead"
member = "BC"
wy = "-1.2 kN/m"

[[loads]]
case = "dead"
member = "CD"
wy = "-1.2 kN/m"

# ---- crane: two wheels in bay BC, at 1.5 m and 4.5 m from B; fx is braking along the rail ----
[[loads]]
case = "crane"
member = "BC"
at = "1.5 m"
fx = "2.5 kN"
fy = "-28 kN"

[[loads]]
case = "crane"
member = "BC"
at = "4.5 m"
fx = "2.5 kN"
fy = "-28 kN"

# the two interior reactions as redundants; mid-bay deflections to report
[analysis]
redundants = ["B.y", "C.y"]
displacements = ["AB@3.y", "BC@3.y", "CD@3.y"]
"""

_REDUNDANT_TRUSS = """\
# Side truss of an overhead conveyor gallery, every panel cross-braced.
#
# Structure : a 12 m pin-jointed steel truss, 2.5 m deep, three 4 m panels, carrying a
#             belt conveyor and its walkway between two trestles. Each panel has both
#             diagonals (small tubes, crossed): one diagonal per panel is redundant.
#             The left trestle L0 holds the truss in both directions (pinned); the right
#             one L3 lets it slide along its length (roller), so the supports alone are
#             statically determinate and all three redundants are internal.
# Loads     : case "belt": belt, idlers, walkway and a 3 kN/m^2 maintenance load, brought
#             to the bottom-chord nodes; case "sun": the top chord, in the sun above the
#             gallery roof, 20 K warmer than the rest of the truss.
# Degree    : 3 (3 internal) - 16 bars + 3 reactions - 2 x 8 joints.
# Try       : leastwork check redundant-truss.toml
#             leastwork solve redundant-truss.toml --case sun --steps
#             leastwork solve redundant-truss.toml --redundants L0U1,L1U2,L2U3 --json
#
# To adapt it: a truss is a set of [bars] between [nodes]; loads go on nodes (bars take no
# span loads). Remove one diagonal of a panel to drop one redundant. Both diagonals of a
# panel are assumed to act, one of them usually in compression: check it for buckling
# separately, and if it is too slender to carry compression (a flat or a rod), remove it
# and solve again.

# name printed on the results; units of bare numbers (force, length) and of the output
[structure]
name = "Conveyor gallery side truss, 12 m, cross-braced panels"
units = { force = "kN", length = "m", displacement = "mm", moment = "kN*m" }

# panel length and depth: change them to resize the whole truss
[parameters]
p = "4.0 m"          # panel length
h = "2.5 m"          # depth between chord centre lines

# alpha is needed only because of the temperature case
[materials.steel]
E = "210 GPa"
alpha = "1.2e-5 1/K"

# bars use only A
[sections.chord]     # square hollow section, 100 mm, 5 mm wall
A = "1870 mm^2"

[sections.post]      # square hollow section, 70 mm, 4 mm wall
A = "1030 mm^2"

[sections.diag]      # circular hollow section, 60.3 mm, 4 mm wall
A = "707 mm^2"

# members without a section of their own are chords
[defaults]
material = "steel"
section = "chord"

# bottom-chord nodes L0..L3, top-chord nodes U0..U3
[nodes]
L0 = [0, 0]
L1 = ["p", 0]
L2 = ["2*p", 0]
L3 = ["3*p", 0]
U0 = [0, "h"]
U1 = ["p", "h"]
U2 = ["2*p", "h"]
U3 = ["3*p", "h"]

# [bars]: pin-ended members carrying axial force only (tension positive in the results)
[bars]
# chords
L0L1 = { nodes = ["L0", "L1"] }
L1L2 = { nodes = ["L1", "L2"] }
L2L3 = { nodes = ["L2", "L3"] }
U0U1 = { nodes = ["U0", "U1"] }
U1U2 = { nodes = ["U1", "U2"] }
U2U3 = { nodes = ["U2", "U3"] }
# posts
L0U0 = { nodes = ["L0", "U0"], section = "post" }
L1U1 = { nodes = ["L1", "U1"], section = "post" }
L2U2 = { nodes = ["L2", "U2"], section = "post" }
L3U3 = { nodes = ["L3", "U3"], section = "post" }
# crossed diagonals, two per panel
L0U1 = { nodes = ["L0", "U1"], section = "diag" }
U0L1 = { nodes = ["U0", "L1"], section = "diag" }
L1U2 = { nodes = ["L1", "U2"], section = "diag" }
U1L2 = { nodes = ["U1", "L2"], section = "diag" }
L2U3 = { nodes = ["L2", "U3"], section = "diag" }
U2L3 = { nodes = ["U2", "L3"], section = "diag" }

# pinned at one end, a roller at the other: externally determinate. Make both pinned
# and the degree goes up by one (an external redundant)
[supports]
L0 = "pinned"
L3 = "roller"

# ---- belt: 4 m panel share at the inner nodes, half of it at the end nodes ----
[[loads]]
case = "belt"
node = "L1"
fy = "-22 kN"

[[loads]]
case = "belt"
node = "L2"
fy = "-22 kN"

[[loads]]
case = "belt"
node = "L0"
fy = "-11 kN"

[[loads]]
case = "belt"
node = "L3"
fy = "-11 kN"

# ---- sun: top chord 20 K warmer (uniform change of each bar's temperature) ----
[[loads]]
case = "sun"
member = "U0U1"
temperature = { uniform = "20 K" }

[[loads]]
case = "sun"
member = "U1U2"
temperature = { uniform = "20 K" }

[[loads]]
case = "sun"
member = "U2U3"
temperature = { uniform = "20 K" }

# no redundants given: the tool picks them (leastwork check shows its choice)
[analysis]
displacements = ["L1.y", "L2.y", "L3.x"]
"""

_PORTAL_FRAME = """\
# Portal frame of a lorry-wash bay canopy, pinned column bases.
#
# Structure : a rectangular steel portal, 8.0 m span, 4.5 m to the beam centre line;
#             columns are rolled H-sections about 203 mm deep, the beam a rolled
#             I-section about 352 mm deep, rigidly bolted at both knees B and C. Both
#             column bases are pinned (base plates with four bolts, no moment assumed).
#             Frames at 5 m centres.
# Loads     : case "roof": sheeting, purlins, services and snow on a 5 m bay, on the beam;
#             case "wind": pressure on the windward column and the roof-edge force at the
#             knee.
# Degree    : 1 (0 internal) - two pinned bases = 4 reactions, 3 equations of statics.
# Try       : leastwork check portal-frame.toml
#             leastwork solve portal-frame.toml --case roof --steps
#             leastwork solve portal-frame.toml --redundants DC.end.m --at B-C,C.x
#
# To adapt it: fixed bases make it degree 3 (A = "fixed", D = "fixed"); a sloping roof
# needs an apex node between B and C; columns drawn upwards (A to B, D to C) put positive
# m on the inside face of the left column but on the outside face of the right one.

# name printed on the results; units of bare numbers (force, length) and of the output
[structure]
name = "Lorry-wash canopy portal, 8 m span, pinned bases"
units = { force = "kN", length = "m", displacement = "mm", moment = "kN*m" }

# span between column centre lines and height to the beam centre line
[parameters]
span = "8.0 m"
h = "4.5 m"

# E of the steel (add alpha for temperature cases)
[materials.steel]
E = "210 GPa"

[sections.col]       # rolled H-section, 203 mm, 46 kg/m
A = "5870 mm^2"
I = "4.57e7 mm^4"

[sections.beam]      # rolled I-section, 352 mm, 45 kg/m
A = "5730 mm^2"
I = "1.21e8 mm^4"

# members without a section of their own are columns
[defaults]
material = "steel"
section = "col"

# bases and knees; x to the right, y up
[nodes]
A = [0, 0]           # left base
B = [0, "h"]         # left knee
C = ["span", "h"]    # right knee
D = ["span", 0]      # right base

# both columns drawn upwards; the beam left to right
[beams]
AB = { nodes = ["A", "B"] }
BC = { nodes = ["B", "C"], section = "beam" }
DC = { nodes = ["D", "C"] }

# pinned bases; a base with some fixity would be
# A = { restrain = ["x", "y"], springs = { rz = "5000 kN*m/rad" } }
[supports]
A = "pinned"
D = "pinned"

# ---- roof: 0.5 kN/m^2 dead + 0.6 kN/m^2 snow, 5 m bay, plus beam self-weight ----
[[loads]]
case = "roof"
member = "BC"
wy = "-6.0 kN/m"

# ---- wind from the left: wall pressure on AB (global +x), roof-edge force at B ----
[[loads]]
case = "wind"
member = "AB"
wx = "2.4 kN/m"

[[loads]]
case = "wind"
node = "B"
fx = "3.5 kN"

# the horizontal reaction at the right base as the redundant; sway of the knees
[analysis]
redundants = ["D.x"]
displacements = ["B.x", "C.x", "BC@4.y"]
"""

_TIED_BEAM = """\
# Entrance canopy beam, moment-connected to the facade and hung from it by a tie rod.
#
# Structure : a 3.6 m steel cantilever (rolled I-section about 203 mm deep) carries a
#             glass canopy over a shop entrance. At A it is bolted to the facade column
#             with an end plate that takes moment (fixed). A 20 mm steel tie rod with a
#             turnbuckle runs from the tip B up to an anchor C in the facade, 2.4 m above
#             A. Beam and rod share the load; the rod also squeezes the beam axially.
# Loads     : case "canopy": glass, frames and snow on a 1.8 m bay; case "turnbuckle":
#             the turnbuckle tightened by 3 mm (the rod made 3 mm too short: a misfit),
#             nothing else; case "both": the two together.
# Degree    : 1 (0 internal) - fixed 3 + pinned anchor 2 = 5 reactions, 4 member
#             forces, 8 equations.
# Try       : leastwork solve tied-beam.toml --steps
#             leastwork solve tied-beam.toml --case turnbuckle
#             leastwork solve tied-beam.toml --redundants A.rz --json
#
# To adapt it: move the anchor (C) or the rod connection along the beam (split the beam
# at a new node and point the bar there); a rod made too short has a negative misfit.

# name printed on the results; units of bare numbers (force, length) and of the output
[structure]
name = "Entrance canopy beam with tie rod and turnbuckle"
units = { force = "kN", length = "m", displacement = "mm", moment = "kN*m" }

# canopy projection and anchor height: the rod geometry follows from them
[parameters]
L = "3.6 m"          # projection of the canopy from the facade
H = "2.4 m"          # height of the tie anchor above the beam

# E of beam and rod (add alpha for a temperature case on the rod)
[materials.steel]
E = "210 GPa"

[sections.ib203]     # rolled I-section, 203 mm, 25 kg/m
A = "3200 mm^2"
I = "2.34e7 mm^4"

[sections.rod20]     # plain round bar, 20 mm: gross area
A = "314 mm^2"

# members without a section of their own use the beam section
[defaults]
material = "steel"
section = "ib203"

# x out from the facade, y up
[nodes]
A = [0, 0]           # beam end at the facade column
B = ["L", 0]         # canopy tip, rod connection
C = [0, "H"]         # rod anchor in the facade

# the canopy beam, drawn from the facade outwards (sagging moments positive)
[beams]
AB = { nodes = ["A", "B"] }

# a bar is pin-ended and carries axial force only: the tie rod
[bars]
CB = { nodes = ["C", "B"], section = "rod20" }

# the moment connection at the facade column, and the rod anchor (a pin)
[supports]
A = "fixed"
C = "pinned"

# ---- canopy: 0.6 kN/m^2 glass and frames + 0.8 kN/m^2 snow on a 1.8 m bay, + beam ----
[[loads]]
case = "canopy"
member = "AB"
wy = "-2.8 kN/m"

# ---- turnbuckle: the rod shortened by 3 mm while it is in place ----
[[loads]]
case = "turnbuckle"
member = "CB"
misfit = "-3 mm"

# ---- both: the two entries repeated under a third case name ----
[[loads]]
case = "both"
member = "AB"
wy = "-2.8 kN/m"

[[loads]]
case = "both"
member = "CB"
misfit = "-3 mm"

# the rod force as the redundant; tip movement and the stretch of the rod (C-B)
[analysis]
redundants = ["CB"]
displacements = ["B.y", "B.x", "C-B"]
"""

_HAUNCHED_PORTAL = """\
# Glued-laminated timber portal for a riding-arena shed, with tapered rafters.
#
# Structure : a 15 m span portal, 5.0 m to the eaves, 1.5 m rise to the apex, frames at
#             5 m centres. Columns are 140 x 600 mm solid glulam. Each rafter is cut from
#             one tapered glulam blank: 900 mm deep at the eaves knee, 600 mm at the end
#             of the knee haunch 3 m along the span, 450 mm at the apex. Rigid knee and
#             apex joints (glued-in rods), both column bases fixed.
# Shows     : tapered beams (section = [start, end], taper = "depth": a solid rectangle
#             whose depth varies linearly, A ~ d and I ~ d^3) beside prismatic ones; the
#             energy of a tapered member integrated numerically (see --steps: the
#             integrand of each coefficient along the taper and the error bound); self
#             weight that tapers with the section; a wind case.
# Degree    : 3 (0 internal) - two fixed bases = 6 reactions, 3 equations of statics.
# Try       : leastwork check haunched-portal.toml
#             leastwork solve haunched-portal.toml --case roof --steps
#             leastwork solve haunched-portal.toml --redundants A.x,A.y,BF.start.m
#             leastwork plot haunched-portal.toml --case roof -o portal.png

# name printed on the results; units of bare numbers (force, length)
[structure]
name = "Glulam portal with tapered rafters, 15 m span"
units = { force = "kN", length = "m" }

# the geometry, used in the node coordinates below
[parameters]
span = "15 m"
eaves = "5.0 m"
rise = "1.5 m"
knee = "3.0 m"           # horizontal length of each knee haunch

# glued-laminated timber
[materials.glulam]       # strength class GL24h, mean stiffness, long-term creep not included
E = "11.5 GPa"
density = "4.2 kN/m^3"

# solid rectangles 140 mm wide; "depth" is what a depth taper interpolates
[sections.column]        # 140 x 600
A = "0.084 m^2"
I = "2.52e-3 m^4"
depth = "600 mm"

[sections.knee]          # 140 x 900, rafter at the eaves knee
A = "0.126 m^2"
I = "8.505e-3 m^4"
depth = "900 mm"

[sections.rafter]        # 140 x 600, end of the knee haunch
A = "0.084 m^2"
I = "2.52e-3 m^4"
depth = "600 mm"

[sections.apex]          # 140 x 450
A = "0.063 m^2"
I = "1.063125e-3 m^4"
depth = "450 mm"

# what a member uses when it names no material or section
[defaults]
material = "glulam"
section = "column"

# x, y in m; F and G end the knee haunches
[nodes]
A = [0, 0]                                   # left base
B = [0, "eaves"]                             # left eaves knee
F = ["knee", "eaves + rise * knee / (span/2)"]          # end of the left haunch
C = ["span/2", "eaves + rise"]               # apex
G = ["span - knee", "eaves + rise * knee / (span/2)"]   # end of the right haunch
D = ["span", "eaves"]                        # right eaves knee
E = ["span", 0]                              # right base

# columns prismatic; each rafter two tapered beams: knee to F, F to the apex
[beams]
AB = { nodes = ["A", "B"] }
BF = { nodes = ["B", "F"], section = ["knee", "rafter"], taper = "depth" }
FC = { nodes = ["F", "C"], section = ["rafter", "apex"], taper = "depth" }
CG = { nodes = ["C", "G"], section = ["apex", "rafter"], taper = "depth" }
GD = { nodes = ["G", "D"], section = ["rafter", "knee"], taper = "depth" }
ED = { nodes = ["E", "D"] }

# both column bases fixed into their foundations
[supports]
A = "fixed"
E = "fixed"

# ---- roof: 0.35 kN/m^2 roofing + 0.9 kN/m^2 snow on 5 m frame spacing ----
[[loads]]
case = "roof"
self_weight = true

[[loads]]
case = "roof"
member = "BF"
wy = "-6.25 kN/m"

[[loads]]
case = "roof"
member = "FC"
wy = "-6.25 kN/m"

[[loads]]
case = "roof"
member = "CG"
wy = "-6.25 kN/m"

[[loads]]
case = "roof"
member = "GD"
wy = "-6.25 kN/m"

# ---- wind from the left: 0.5 kN/m^2 pressure, 0.3 kN/m^2 suction, 5 m spacing ----
[[loads]]
case = "wind"
member = "AB"
wx = "2.5 kN/m"

[[loads]]
case = "wind"
member = "ED"
wx = "1.5 kN/m"

# the apex drop, the eaves sway and the spread of the eaves
[analysis]
displacements = ["C.y", "B.x", "D.x", "B-D"]
"""

#: kind -> (one-line description, case file text)
STARTERS: dict[str, tuple[str, str]] = {
    "propped-beam": ("a beam fixed at one end and resting on a support at the other "
                     "(degree 1), with a settling support", _PROPPED_BEAM),
    "continuous-beam": ("a girder continuous over three equal bays (degree 2), dead load "
                        "and two moving wheel loads", _CONTINUOUS_BEAM),
    "redundant-truss": ("a pin-jointed truss with both diagonals in every panel (degree 3, "
                        "internal), loads and a warm top chord", _REDUNDANT_TRUSS),
    "portal-frame": ("a rectangular portal frame with pinned bases (degree 1), roof and "
                     "wind cases", _PORTAL_FRAME),
    "tied-beam": ("a cantilever beam held up by an inclined tie rod (degree 1), with a "
                  "turnbuckle misfit", _TIED_BEAM),
    "tension-only-bracing": ("a braced bay whose crossed rods go slack rather than push "
                             "(degree 3), wind both ways and drawn-up rods",
                             BRACED_BAY_TENSION_ONLY),
    "us-propped-beam": ("a floor beam built in and propped, in kip, ft, in, ksi, with a "
                        "deflection limit L/360", US_PROPPED_BEAM),
    "haunched-portal": ("a glulam portal with tapered rafters and fixed bases (degree 3), "
                        "roof and wind cases", _HAUNCHED_PORTAL),
}


def starter_kinds() -> list[str]:
    """The starter kinds, in the order they are listed."""
    return list(STARTERS)


def starter_text(kind: str) -> str:
    """The commented case file of starter ``kind``.

    Raises
    ------
    CaseError
        If ``kind`` is not a starter; the message lists the kinds.
    """
    if kind in STARTERS:
        return STARTERS[kind][1]
    close = difflib.get_close_matches(kind, list(STARTERS), n=1, cutoff=0.5)
    hint = f' (did you mean "{close[0]}"?)' if close else ""
    raise CaseError(f'no starter of kind "{kind}"{hint}; the kinds are: '
                    + ", ".join(STARTERS), source="command line", where="new")
