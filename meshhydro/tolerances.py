"""Every numerical tolerance of the library, named once (dimensionless unless a unit is given).

Lengths are scaled by the hull's length L where noted; angles are in degrees.
"""
from __future__ import annotations

# ---------------------------------------------------------------- solver (meshhydro.solver)
#: Relative volume error at which a floating position is accepted.
VOLUME_TOL = 1e-10
#: Horizontal lever of B about G at which a position is accepted, as a fraction of L.
LEVER_TOL = 1e-8
#: Fallback acceptance of the volume solve when its bracket has closed (relative volume error).
VOLUME_ACCEPT = 1e-9
#: A load needing this fraction of the closed hull's volume or more cannot float.
FULLY_SUBMERGED = 1e-12
#: A load within this fraction of the closed hull's whole buoyancy is neutral: it floats fully submerged
#: (about what a displacement given to 7 significant digits can match; our own choice). Heavier sinks.
NEUTRAL_BUOYANCY = 1e-6
#: The volume bracket is closed when narrower than this fraction of max(L, 1 m) (rim bisection).
RIM_BRACKET = 1e-12
#: The volume bracket is closed when narrower than this fraction of max(L, 1 m).
VOLUME_BRACKET = 1e-15
#: Iteration limits of the volume solve, Newton and the backtracking line search.
VOLUME_MAX_ITER = 200
NEWTON_MAX_ITER = 40
BACKTRACK_STEPS = 8
#: Largest Newton step in heel and in trim [deg].
MAX_HEEL_STEP = 8.0
MAX_TRIM_STEP = 4.0
#: Sufficient decrease (Armijo) constant and the smallest step fraction taken regardless.
ARMIJO = 1e-4
MIN_STEP_FRACTION = 0.02
#: Largest draft step: this share of the depth plus this share of the size of the hull.
DRAFT_STEP_DEPTH = 0.25
DRAFT_STEP_SIZE = 0.1
#: Bracketed trim search: trim limits [deg], first and largest half-width [deg], Brent tolerances.
TRIM_LIMIT = 60.0
TRIM_BRACKET_START = 1.0
TRIM_BRACKET_MAX = 64.0
BRENT_XTOL = 1e-13
BRENT_RTOL = 1e-14
BRENT_MAX_ITER = 200
#: Newton polish after the bracketed trim.
POLISH_MAX_ITER = 6
#: Two angles closer than this [deg] are the same angle.
SAME_ANGLE = 1e-12
#: Loll search: step [deg] and last angle [deg]; loll angles closer than this [deg] are a tie.
LOLL_STEP = 1.0
LOLL_LAST = 90.0
LOLL_TIE = 1e-6
#: Fixed-point iterations for a submerged attitude when G moves with it (a fluid load), and their
#: tolerance on the upward vertical.
SUBMERGED_MAX_ITER = 50
SUBMERGED_TOL = 1e-13
#: A stable position heeled beyond this [deg] is a capsize (on its side or inverted; common practice).
CAPSIZE_ANGLE = 90.0
#: Guard against division by an empty volume [m³].
TINY_VOLUME = 1e-300

# ---------------------------------------------------------------- curves and criteria
#: Slack on angle ranges of a computed curve [deg].
ANGLE_SLACK = 1e-9
#: Slack on a spline root lying at an interval end [deg].
ROOT_SLACK = 1e-12
#: A criterion is met when attained >= minimum - this.
CRITERION_SLACK = 1e-12
#: GZ at 180° within this share of the curve's largest |GZ| is rounding noise of an exact zero (vanishing at 180°).
GZ_ROUNDING = 1e-9
#: A heel counts as upright when its magnitude is below this [deg].
UPRIGHT = 1e-12

# ---------------------------------------------------------------- geometry
#: Floor for a length used as a scale [m] (a degenerate hull of zero extent).
TINY_LENGTH = 1e-9
#: A mesh is port-starboard symmetric when every mirrored vertex lies within this fraction of its size.
SYMMETRY = 1e-6
#: A load is on the centreline when |TCG| is below this [m].
CENTRELINE = 1e-12
#: Submergence sequence: a waterplane smaller than this share of the largest in the sequence is "small".
SMALL_WATERPLANE = 0.1
#: A listed equilibrium is reported when |heel| exceeds this [deg].
LIST_NOTE = 0.01

# ---------------------------------------------------------------- refined curve values (meshhydro.curve_probe)
#: Bounded search for the angle of maximum GZ: abscissa tolerance [deg] and iteration limit.
PEAK_XTOL = 1e-7
PEAK_MAX_ITER = 200
#: Root finder for vanishing, deck-edge, downflooding and equilibrium angles: tolerance [deg].
ROOT_XTOL = 1e-10
#: The draft T along hull z is undefined (reported as NaN) where |up_z| is below this (heel or trim 90°).
DRAFT_DEFINED = 1e-9
#: Bisection tolerance of the swamping angle of an open hull [deg].
SWAMP_XTOL = 1e-9
