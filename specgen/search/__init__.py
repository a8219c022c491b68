"""Catalogue-wide design search: every core x stack x bobbin x wire x strands choice in stock, ranked.

A requirement file (``load_requirement``) says what the part must do; ``search`` answers which of the
shop's cores and wires can do it, and at what loss, temperature, size and material cost. Three stages:

1. Screen, per core choice (McLyman's area product, ``physics.sizing.area_product_m4``): a core whose
   Wa Ae is below the area product the requirement needs even at a generous window utilisation
   (``AP_KU``), the highest current density considered (``J_HIGH`` x the shop's) and the flux limit is
   set aside as "too small a window"; so is a bobbin with too few pins. Nothing else is evaluated for it.
2. Vectorised evaluation: one numpy row per (core choice, wire option of every winding), evaluated with
   the design kernel's array-capable steps (``specgen.design.kernel``: flux limit and swing, Faraday turns,
   magnetizing current, the section winding, DCR, skin depth, core loss, temperature rise with its cooling
   table, choke turns and gap) and the engine's own core resolution and choke currents; the search writes
   no formula of its own. Where it is the engine's calculation (tested against the engine winding by
   winding): core parameters and former; the layer build (turns per layer, layers, each layer's own MLT);
   copper length and DCR; each section's AC factor (every layer's own factor at its own turns and MMF,
   weighted by its copper length: a closed-form sum over the full layers of a bobbin, layer by layer on a
   toroid); core loss; the rise and hot spot; flux limit, class and fit checks. Given the engine's primary
   turns, hot spot and efficiency it gives the engine's turns, AC factors and losses.
   Where it differs, for screening and ranking only:
   - one pass at the engine's first-guess temperature and efficiency, then one more at the hot spot and
     efficiency that pass settled at (the engine re-derives turns and AC factor at every thermal step);
   - secondary turns are compensated for the resistive drop only (the engine adds the leakage reactance
     of a sine drive in quadrature);
   - above 1 kHz the engine scans the primary turns up to 3 n0 for the least loss; the vector stage
     evaluates n0 and one analytic optimum N = n0 (beta P_core / (2 P_cu))^(1/(beta + 2)) (core loss
     ~ N^-beta, copper loss ~ N^2).
   Rows: for a transformer, each winding's options are first evaluated alone on each core (height from
   the tube, copper loss, cost, class) and an option no better than another of the same winding in all
   four is dropped (``prune_options``): it could only make every design it enters worse. Only where a
   core still has more than ``ROWS_PER_CORE_MAX`` combinations (four or more windings) are the options
   thinned further, to each winding's height-loss and height-cost fronts (an approximation; reported).
   Chokes have one winding: every core x option row is evaluated.
3. Scalar confirmation: the best rows by the sort key, and the rows on the loss-cost Pareto front, are
   written as draft specs (``draft_spec_text``) and run through ``api.run_design``. Every number the
   search prints is from those Designs, so ``--write`` + ``specgen design`` reproduce them exactly. The
   vector ranking is corrected core by core from the engine results as they come in (its cost leaves
   out tapes, sleeving and varnish), and rows keep being run while they could still enter the list.

Material cost per unit is ``quote.material_total(quote.material_lines(design, cat))`` when the quote
module is there (wire mass x price x scrap, core, bobbin, tapes, sleeving, varnish), else wire mass x
price x (1 + scrap) + core + bobbin from catalogue prices (Decimal either way; the vector stage ranks
with a float estimate of wire + core + bobbin).

Modules: ``requirement`` (the requirement file), ``candidates`` (core choices, insulation plan, wire options,
the area-product screen), ``records`` (kind codes, failure flags, the arrays passed between stages),
``steps`` (the engine's steps on arrays), ``context`` (the tables the evaluation reads), ``evaluate`` (the
vectorised model), ``rows`` (the candidate set and the vector stage), ``confirm`` (the engine's run of one
candidate), ``rank`` (the search, its list, front and failure reasons), ``draft`` (spec text), ``report``
(text, JSON, progress).
"""

from __future__ import annotations

from .candidates import CoreChoice, InsulationPlan, WireOption, core_choices, insulation_plan, outline_m, wire_options
from .confirm import SORTS, Candidate, VectorNumbers, material_cost, run_candidate
from .context import SearchContext, choke_magnetics
from .draft import draft_spec_text, requirement_spec
from .evaluate import build_rows, eval_choke, eval_transformer, evaluate_rows
from .rank import FamilyFailure, SearchResult, pareto_indices, search
from .records import Fail, FormerKind, RowResult, VectorStage, WireKind
from .report import Progress, result_json, result_text
from .requirement import KINDS, RATINGS, ChokeDuty, Limits, Requirement, ReqWinding, load_requirement, parse_requirement
from .rows import Prepared, SearchStats, nondominated, prepare, run_vector_stage, total_rows
from .steps import section_ac_factor_rows, wind_section_rows

__all__ = [
    "KINDS", "RATINGS", "SORTS", "Candidate", "ChokeDuty", "CoreChoice", "FamilyFailure", "Fail", "FormerKind",
    "InsulationPlan", "Limits", "Prepared", "Progress", "ReqWinding", "Requirement", "RowResult", "SearchContext",
    "SearchResult", "SearchStats", "VectorNumbers", "VectorStage", "WireKind", "WireOption", "build_rows",
    "choke_magnetics", "core_choices", "draft_spec_text", "eval_choke", "eval_transformer", "evaluate_rows",
    "insulation_plan", "load_requirement", "material_cost", "nondominated", "outline_m", "parse_requirement",
    "pareto_indices", "prepare", "requirement_spec", "result_json", "result_text", "run_candidate",
    "run_vector_stage", "search", "section_ac_factor_rows", "total_rows", "wind_section_rows", "wire_options",
]
