"""The design calculation's fixed figures, in one place (no numpy, so the spec parser can read them).

Each is a rule of the shop or of the trade; the comment beside it says which and where it comes from.
``kernel`` re-exports them; the engine, the kinds and the search read them from there.
"""

from __future__ import annotations

MAX_TURNS = 20000              # the most turns this tool winds on one winding (beyond: not a sensible part)

# wire choice (``wires.choose_wire``) and the search's wire options
STRAND_MAX_SKIN_DEPTHS = 2.0   # a strand thicker than two skin depths: the layer's AC factor climbs quickly
                               # (common practice)
LITZ_STRAND_MAX_SKIN_DEPTHS = 0.5  # Litz strands at or below half a skin depth: near one skin depth the
                               # proximity effect between a bundle's strand layers undoes the benefit (Dowell)
MAX_STRANDS_ROUND = 8          # strands in hand of round wire (shop practice: more winds badly)
MAX_BUNDLES_LITZ = 6           # Litz bundles in parallel (shop practice)
MAX_STRANDS_TIW = 4            # triple-insulated wire in hand (shop practice; the search's limit)
WIRE_CHOICE_TEMP_C = 100.0     # the skin depth for the strand limit at a typical hot copper temperature
RIPPLE_SKIN_FRACTION = 0.2     # a choke's ripple rms below 20 % of DC: the wire the DC current alone sets is
                               # tried beside the skin-limited one, and the lower copper loss that fits is kept
                               # (its AC factor, not a rule of thumb, decides; common practice threshold)

# loss-limited turns. With core loss ~ N^-beta (Steinmetz at fixed volts) and copper loss ~ N^2 (fixed window
# share), the total falls with more turns exactly while beta P_core > 2 P_cu (the least total loss has
# P_core / P_cu = 2 / beta: McLyman's optimum, core loss near copper loss). The engine scans the turns wherever
# beta P_core reaches this fraction of 2 P_cu at the saturation-limited turns, at any frequency: whole secondary
# turns and a wire re-sized per candidate make the real curve ragged, so it starts a little before the slope
# turns (common practice: a margin on an analytic optimum).
CORE_LOSS_SCAN_FRACTION = 0.5

# AC factor
# Odd harmonics of a square-wave current, weighted 1/n^2. An ideal square wave's sum never settles (the
# proximity factor grows with n); stopping at the 39th stands for edges of about 1 % of the period, a
# power stage's usual rise time (common practice). Summing to the 199th raises BH-2210's primary Fr
# from 2.0 to 3.0 but its total loss only ~7 %: the core loss dominates there.
SQUARE_HARMONICS = tuple(range(1, 40, 2))
RECTIFIER_HARMONICS = tuple(range(1, 40, 2))   # a capacitor-input bridge's current: odd orders to the 39th hold
                                               # over 99.9 % of its mean square for omega C R_L up to 300

# gaps
GAP_STEP_M = 1e-5              # gaps are ground or shimmed to 0.01 mm (common practice)
IRON_SHARE_WARN = 0.5          # the core holds more than half the magnetic path's reluctance (l_e / mu against
                               # the gap): the iron, not the gap, sets the inductance and its tolerance

# temperature
FIRST_GUESS_RISE_K = 40.0      # the temperature loop starts from a 40 K rise (a typical class-B design)
MAX_HOT_C = 1000.0             # the thermal loop stops here: a design this hot fails its checks anyway
THERMAL_SETTLED_K = 0.02       # the loop ends when the hot spot moves less than this between passes
THERMAL_MAX_PASSES = 60
# forced air (``kernel.temperature_rise_k``): the air's properties are taken at the film temperature
# ambient + FIRST_GUESS_RISE_K / 2, held inside the air table of ``physics.cooling`` (Incropera and DeWitt,
# Table A.4); the flow length at most 0.25 m keeps Re = v L / nu below the laminar limit 5e5 up to 20 m/s
# the highest air speed taken (spec or shop): the boundary layer stays laminar to it over FLOW_LENGTH_MAX_M, and
# no fan-cooled wound part sees more (common practice)
AIR_SPEED_MAX_M_S = 20.0
AIR_FILM_MIN_C = -23.0
AIR_FILM_MAX_C = 127.0
FLOW_LENGTH_MAX_M = 0.25

# Curie point: permeability and saturation fall steeply in the last tens of kelvin below it; a hot spot within
# this of it warns (common practice)
CURIE_WARN_K = 30.0
# thermal runaway: a stability margin 1 - R_th dP/dT below this warns (the loss coefficient or the ambient a
# little higher and there is no balance; common practice)
RUNAWAY_WARN_MARGIN = 0.3

# toroids
TOROID_MIN_HOLE_M = 8e-3          # a shuttle needs a hole; the shop's smallest shuttle (common practice)
TOROID_MIN_HOLE_FRACTION = 0.25   # ... or a quarter of the bore, whichever is larger
