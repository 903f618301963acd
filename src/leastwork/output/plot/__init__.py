"""Diagrams of a solved structure, drawn to scale: the structure with its supports, loads,
imposed effects and redundants; the axial force n, shear force v and bending moment m drawn
along each member, square to it; the deflected shape, magnified.

Signs follow docs/conventions.md: n tension positive and v = dm/dx, both drawn on the
member's local +y side when positive; m drawn on the *tension side* (a positive m stretches
the local -y face, so it is drawn towards local -y). Every value is shown in the case units.

matplotlib is imported only inside functions; figures are made without pyplot (no global
state) and rendered by the Agg (PNG) or SVG canvas. Text from the case (names, ids, load
cases) is drawn through :func:`leastwork.plaintext.literal`.

Modules, one job each:

* ``style`` - palette, label sizes, the text given to matplotlib;
* ``geometry`` - size of the structure, 1-2-5 factors, case units, member axes, the sides
  supports and labels go on;
* ``panel`` - one axes and its shapes: lines, polygons, arrows, labels that keep apart;
* ``data`` - the diagrams asked for, n, v, m sampled per member, the deflected shape;
* ``structure`` - members, supports, springs, names, scale bar, redundants X;
* ``loads`` - one drawer per load kind (:data:`loads.LOAD_DRAWERS`);
* ``forces`` - the n, v and m panels; ``deflected`` - the deflected shape panel;
* ``figure`` - the panels in bands per load case at one scale; ``files`` - PNG and SVG,
  one file or one per load case;
* ``numbers`` - how values are printed; ``textsize`` - label extents from the renderer;
  ``arrows`` - arrows with one end on a node; ``influence`` - influence lines;
  ``fitup`` - the locked-in forces of a fit-up study.
"""

from __future__ import annotations

from .data import (
    DEFLECTION_SHARE,
    DIAGRAMS,
    deflection_scale,
    diagram_lines,
    parse_diagrams,
)
from .files import IMAGE_FORMATS, case_file_names, case_images, figure_svg, plot_case
from .geometry import nice_factor, structure_size

__all__ = ["DIAGRAMS", "IMAGE_FORMATS", "DEFLECTION_SHARE", "plot_case", "figure_svg",
           "case_images", "case_file_names",
           "parse_diagrams", "diagram_lines", "deflection_scale", "nice_factor",
           "structure_size"]
