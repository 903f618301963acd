"""Starter case texts of the one-way and US-unit starters (see :mod:`.starters`)."""

from __future__ import annotations

__all__ = ["BRACED_BAY_TENSION_ONLY", "US_PROPPED_BEAM"]

BRACED_BAY_TENSION_ONLY = """\
# End bay of a small steel frame, braced by crossed rods that cannot push.
#
# Structure : a 5 m bay of two 4 m columns with pinned bases and a beam rigidly joined
#             to both column heads, braced by two crossed M20 rods. A rod in compression
#             buckles at once and carries nothing: acts = "tension" says so. In each
#             load case the rod that would be pushed goes slack and the case is solved
#             again without it; the summary says which rod acts.
# Loads     : wind from either side at the beam; case "drawn_up": turnbuckles draw
#             both rods 1 mm short (a misfit); combinations of the two, each settling
#             in its own state (no superposition across states).
# Degree    : 3 (2 internal) - the portal 1, one per rod.
# Try       : leastwork solve tension-only-bracing.toml --case left
#             leastwork fitup tension-only-bracing.toml --tolerance R1=1mm,R2=1mm
#             leastwork solve tension-only-bracing.toml --redundants R1,R2,A.x --json
#
# To adapt it: change the [parameters] (bay, height), the rod size, and the loads.
# Any line starting with "#" is a comment and can be deleted.

# [structure]: the name on every result; bare numbers in kN and m; output units
[structure]
name = "Braced bay with tension-only rods"
units = { force = "kN", length = "m", displacement = "mm", moment = "kN*m", stress = "MPa" }

# [parameters]: named values used below
[parameters]
bay = "5.0 m"        # column centres
h = "4.0 m"          # column height to the beam

# [materials]: elastic modulus
[materials.steel]
E = "210 GPa"

[sections.column]    # a rolled column section
A = "53.8 cm^2"
I = "8356 cm^4"
depth = "300 mm"

[sections.rod]       # M20 rod, gross area
A = "314 mm^2"

# [defaults]: what a member uses when it names nothing
[defaults]
material = "steel"
section = "column"

# [nodes]: x, y of every joint
[nodes]
A = [0, 0]
B = ["bay", 0]
C = ["bay", "h"]
D = [0, "h"]

# [beams]: columns and the beam, rigidly joined at D and C
[beams]
AD = { nodes = ["A", "D"] }
BC = { nodes = ["B", "C"] }
DC = { nodes = ["D", "C"] }

# [bars]: the rods, tension only
[bars]
R1 = { nodes = ["A", "C"], section = "rod", acts = "tension" }   # goes slack, never pushes
R2 = { nodes = ["B", "D"], section = "rod", acts = "tension" }

# [supports]: pinned bases
[supports]
A = "pinned"
B = "pinned"

[[loads]]            # wind from the left, at the beam
node = "D"
fx = "8 kN"
case = "wind_left"

[[loads]]            # wind from the right
node = "C"
fx = "-8 kN"
case = "wind_right"

[[loads]]            # turnbuckles: each rod 1 mm shorter than the distance between pins
member = "R1"
misfit = "-1 mm"
case = "drawn_up"

[[loads]]
member = "R2"
misfit = "-1 mm"
case = "drawn_up"

[combinations]       # each combination finds its own state (no superposition across states)
left = { drawn_up = 1.0, wind_left = 1.5 }
right = { drawn_up = 1.0, wind_right = 1.5 }
"""

US_PROPPED_BEAM = """\
# Floor beam of a mezzanine in US customary units, built into a wall and propped at its end.
#
# Structure : a 22 ft W12x26 beam cast into a concrete wall at A (fixed) and resting on a
#             pipe column at B (a roller).
# Loads     : floor dead and live loads (klf); strength and service combinations. The
#             deflection is checked against L/360 and the stress from the section
#             modulus S.
# Degree    : 1 (0 internal) - fixed 3 + roller 1 = 4 reactions, 3 equations.
# Try       : leastwork solve us-propped-beam.toml --case service
#             leastwork solve us-propped-beam.toml --units kN,m,displacement=mm
#             leastwork solve us-propped-beam.toml --redundants A.rz --json
#
# Units as US engineers write them: kips and feet, deflections in inches, moments in
# kip*ft, loads in klf, stresses in ksi. Bare numbers are read in kip and ft.
# To adapt it: change the span, the section (A, I, S) and the loads.

# [structure]: the name on every result and the units of input and output
[structure]
name = "Propped floor beam (US units)"
units = { force = "kip", length = "ft", displacement = "in", moment = "kip*ft", distributed = "klf", stress = "ksi" }

# [parameters]: named values used below
[parameters]
L = "22 ft"          # wall face to the prop

# [materials]: elastic modulus
[materials.steel]
E = "29000 ksi"

[sections.w12x26]    # a wide-flange section: area, second moment, elastic modulus
A = "7.65 in^2"
I = "204 in^4"
S = "33.4 in^3"

# [defaults]: what a member uses when it names nothing
[defaults]
material = "steel"
section = "w12x26"

# [nodes]: x, y of every joint
[nodes]
A = [0, 0]           # wall (built in)
B = ["L", 0]         # prop

# [beams]: the floor beam
[beams]
AB = { nodes = ["A", "B"] }

# [supports]: built into the wall at A, on a column at B
[supports]
A = "fixed"
B = "roller"

[[loads]]            # floor dead load
member = "AB"
wy = "-0.45 klf"
case = "dead"

[[loads]]            # floor live load
member = "AB"
wy = "-0.60 klf"
case = "live"

# [combinations]: factored load cases, each solved as a load case
[combinations]
strength = { dead = 1.2, live = 1.6 }
service = { dead = 1.0, live = 1.0 }

# [analysis]: the deflection limit L/360 and a displacement to report
[analysis]
deflection_limits = { span = 360 }
displacements = ["B.y"]
"""
