"""The commented starter specs that ``specgen new`` writes.

Each starter is a complete, working spec (it designs with the shipped catalogue as it stands) in
which every key the spec format knows is either set or shown commented out, each with a comment
saying what it means and what it defaults to. It starts as revision A in draft: drafts carry the
letter they will be released as (see ``specgen.revision``), and ``specgen release`` keeps it.

The values are an example to edit, not a recommendation: a 24 VA, 50 Hz control transformer on
an EI lamination, and a 100 uH, 5 A output choke on a gapped ferrite ETD core.
"""

from __future__ import annotations

import os
from pathlib import Path

from .errors import SpecError

KINDS = ("transformer", "inductor")

_HEAD = """\
# {part}: new {kind} (starter spec written by `specgen new`; replace the example values).
#
# One YAML file per part, kept in git. Quantities carry their unit ("230 V", "4 mm", "47 uH").
# Catalogue ids (core, wire, tape, sleeving, varnish) are the shop's stock: list them with
#   specgen catalog list cores        (also wires, bobbins, tapes, sleevings, varnishes)
# Check this file with `specgen design {file}`; release it with
#   specgen release {file} --by "Your Name" --note "first release"

{part_line}# the part number; also the name of this file
title: "{title}"   # one line describing the part
revision: A                  # drawing revision letter (A, B, ... without I, O, Q, S, X, Z; then AA)
status: draft                # draft | released | obsolete; `specgen release` sets it, do not edit by hand
customer: ""                 # who the part is for (shown on work orders and quotes)
{kind_line}# transformer | inductor
"""

_TRANSFORMER = """
core:                        # the magnetic core, from the catalogue
  id: EI-100                 # catalogue core (EI lamination, ferrite E/ETD/PQ/RM/POT, or toroid)
  stack: 25.4 mm             # EI only: stack height, one of the core's stacks in the catalogue
  # count: 1                 # cores stacked side by side (default 1)
  # bobbin: BOB-EI100-25.4   # catalogue bobbin; default: the first that fits the core and stack

operating:                   # how the part is driven and where it lives
  frequency: 50 Hz           # of the supply (or the switching frequency)
  waveform: sine             # sine | square | unipolar (a flyback-style pulse; give duty)
  # duty: 0.5                # unipolar: on-time fraction (default 0.5)
  ambient: 40 degC           # air around the part in service
  cooling: natural           # natural | forced | potted
  # air_speed: 2 m/s         # forced: the air over the part (default: the shop's cooling.air_speed)
  insulation_class: 130 (B)  # IEC 60085 thermal class: 105 (A), 120 (E), 130 (B), 155 (F), 180 (H), ...
  # flux_limit: 1.3 T        # peak flux density limit; default: the shop's fraction of B_sat when hot
  # efficiency: 0.9          # first guess for the iteration (default 0.9)

windings:                    # list order is the build order unless build_order says otherwise
  - name: P                  # short name used in build_order, barriers and on the work order
    role: primary            # primary | secondary | auxiliary | shield | reset (inductors: main)
    voltage: 230 V           # rms for sine; amplitude for square/unipolar
    voltage_max: 253 V       # top of the range (+10 %): the flux check uses it
    wire: auto               # catalogue wire id, auto (round magnet wire) or auto-litz
    # strands: 1             # strands in hand (parallel); default: decided by the design
    # turns: 1330            # fix the turn count instead of calculating it
    # sections: 1            # split the winding (interleaving); give section_pins then
    # section_pins: ["2"]    # tie pins between sections (sections - 1 of them)
    # section_shares: [2, 1] # an uneven split: each section's share of the turns (equal if not given)
    start: "1"               # pin names, quoted so that YAML keeps them as text
    finish: "2"              # the pin the winding ends on
    direction: cw            # cw | ccw seen from the start flange
    # margin: 2 mm           # creepage margin each side (default: insulation.margin)
    # lead_sleeving: SLV-GLSIL-1.0   # sleeving on this winding's leads (default: insulation.sleeving)
  - name: S
    role: secondary
    voltage: 24 V            # at full load
    current: 1 A             # rms at full load (or va: 24 VA)
    # va: 24 VA              # instead of current: the winding's apparent power
    # same_turns_as: P       # wind the same turns as another winding of the same role and voltage
    # load: converter        # what it feeds: resistive | converter | forward | {type: bridge_capacitor,
    #                        # capacitance: 4700 uF} | {type: centre_tapped, other_half: S2} |
    #                        # {type: gate_drive, gate_charge: 60 nC, gate_resistance: 5 ohm}
    wire: auto
    start: "5"
    finish: "6"
    direction: cw

# build_order: [P, S]        # winding order from the tube out; sections as P.1, P.2

insulation:                  # tapes, margins, sleeving, varnish and the required insulation
  layer_tape: {tape: TAPE-PET25-35MM, layers: 1}    # between layers: at least as wide as the copper
  winding_tape: {tape: TAPE-PET25-35MM, layers: 2}  # between windings: flange to flange across a barrier
  outer_wrap: {tape: TAPE-PET25-35MM, layers: 2}    # over the last winding
  margin: 2 mm               # creepage margin each side of every winding (0 for none)
  margin_tape: TAPE-MARGIN-2MM   # the tape that builds the margins
  sleeving: SLV-GLSIL-1.0    # on every lead
  varnish: VAR-PEI-F         # dip varnish (leave out for none)
  barriers:                  # insulation the hipot tests check
    - between: [P, S]        # two windings, 'all' (every winding tied together) or 'core'
      grade: basic           # functional | basic | supplementary | double | reinforced
      working_voltage: 253 V # the highest rms voltage across this insulation in service
      # peak_voltage: 400 V  # the working peak, where it is not sqrt(2) x rms
    - between: [all, core]
      grade: basic
      working_voltage: 253 V

notes: >                     # for the winding bench and the test station, printed on the work order
  Notes for the winding bench and the test station, printed on the work order.

history: []                  # release records; `specgen release` appends to it, do not edit by hand
"""

_INDUCTOR = """
core:                        # the magnetic core, from the catalogue
  id: ETD-34-F100            # catalogue core; a gapped choke needs a gappable ferrite core
  gap: auto                  # auto (calculated) | none | a fixed gap such as 0.8 mm
  gap_arrangement: centre    # centre (ground centre leg) | spacer (spacer in every leg) | none
  # bobbin: BOB-ETD34-PIN20    # catalogue bobbin; default: the first that fits the core
  # count: 1                 # cores side by side (default 1)

operating:                   # how the part is driven and where it lives
  frequency: 100 kHz         # the ripple frequency
  ambient: 50 degC           # air around the part in service
  cooling: natural           # natural | forced | potted
  # air_speed: 2 m/s         # forced: the air over the part (default: the shop's cooling.air_speed)
  insulation_class: 155 (F)  # IEC 60085 thermal class: 130 (B), 155 (F), 180 (H), ...
  # flux_limit: 0.3 T        # peak flux density limit; default: the shop's fraction of B_sat when hot

inductor:                    # what the choke must do
  inductance: 100 uH         # at the full DC current
  # voltage_drop: 10 V       # instead of inductance, for an AC reactor: drop at rated current
  current: 5 A               # DC current (AC reactor: rms)
  ripple: 1.5 A              # peak to peak at the operating frequency
  current_peak: 6 A          # over-current the core must not saturate at (a PFC choke: the line peak)
  # inductance_min: 60 uH    # least inductance at current_peak (checked; a powder rolls off towards it)
  duty: 0.5                  # switching duty (for the ripple waveform)

windings:                    # an inductor has one winding (split it with sections: N)
  - name: L                  # short name shown on the work order
    role: main               # an inductor's winding is its main winding
    wire: auto               # catalogue wire id, auto or auto-litz
    # strands: 2             # strands in hand; default: decided by the design
    # turns: 20              # fix the turn count instead of calculating it
    start: "1"               # pin names, quoted so that YAML keeps them as text
    finish: "10"             # the pin the winding ends on
    direction: cw            # cw | ccw seen from the start flange
    margin: 1 mm             # creepage margin each side

insulation:                  # tapes, sleeving and varnish
  layer_tape: {tape: TAPE-PI25-20MM, layers: 1}     # between layers
  outer_wrap: {tape: TAPE-PI50-25MM, layers: 2}     # over the winding
  sleeving: SLV-PTFE-1.5     # on every lead
  varnish: VAR-PEI-F         # dip varnish (leave out for none)

notes: >                     # for the winding bench and the test station, printed on the work order
  Notes for the winding bench and the test station, printed on the work order.

history: []                  # release records; `specgen release` appends to it, do not edit by hand
"""

_TITLES = {"transformer": "Control transformer 230 V 50 Hz to 24 V, 24 VA (example, edit it)",
           "inductor": "Output choke 100 uH at 5 A DC, 100 kHz ripple (example, edit it)"}

def _check_part(part: str) -> str:
    """The one part-number rule (``specgen.part_numbers``): what ``new`` writes, ``design`` accepts."""
    from .part_numbers import check_part_number

    return check_part_number(part, path="PART")


def starter_text(part: str, kind: str, file_name: str | None = None) -> str:
    """The commented starter spec for ``part`` (revision A, draft)."""
    part = _check_part(part)
    if kind not in KINDS:
        raise SpecError(f"kind must be one of {', '.join(KINDS)}, got '{kind}'", path="--kind")
    file_name = file_name or f"{part}.yaml"
    head = _HEAD.format(part=part, kind=kind, file=file_name, title=_TITLES[kind],
                        part_line=f"part: {part} ".ljust(29),
                        kind_line=f"kind: {kind} ".ljust(29))
    return head + (_TRANSFORMER if kind == "transformer" else _INDUCTOR)


def default_path(part: str) -> Path:
    return Path(f"{_check_part(part)}.yaml")


def write_starter(part: str, kind: str, out: str | os.PathLike | None = None) -> Path:
    """Write the starter spec; never overwrites an existing file (SpecError).

    Written to a temporary file in the same folder and then linked into place: the link fails
    if the name exists, so even a file created meanwhile is not overwritten, and a reader never
    sees half a file.
    """
    path = Path(out) if out is not None else default_path(part)
    if path.exists() or path.is_symlink():
        raise SpecError("already exists; not overwritten (choose another --out)", file=str(path))
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise SpecError(f"no such folder '{folder}'", file=str(path))
    text = starter_text(part, kind, path.name)
    tmp = folder / f".{path.name}.{os.getpid()}.tmp"
    exists = SpecError("already exists; not overwritten (choose another --out)", file=str(path))
    try:
        with open(tmp, "x", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
            fh.flush()
            os.fsync(fh.fileno())
        try:
            os.link(tmp, path)
        except FileExistsError:
            raise exists from None
        except OSError:
            # a file system without hard links: exclusive create, then the content
            try:
                with open(path, "x", encoding="utf-8", newline="\n") as fh:
                    fh.write(text)
            except FileExistsError:
                raise exists from None
    except OSError as exc:
        raise SpecError(f"cannot write: {exc.strerror or exc}", file=str(path)) from None
    finally:
        try:
            os.unlink(tmp)
        except OSError:
            pass
    return path
