"""Write the current content fingerprint into the last history entry of each shipped demo spec.

The demo parts are shipped "released"; their recorded fingerprints must match the demo catalogue, or
the work orders and quotes of `make demo` would be refused. Run this after changing a catalogue entry a
demo part uses (tests/test_demo.py fails until you do):

    .venv/bin/python tools/record_demo_fingerprints.py
"""

import re
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from specgen.api import demo_specs, design_file
from specgen.atomic import write_atomic


def main() -> None:
    for path in demo_specs():
        d = design_file(path)
        text = path.read_text(encoding="utf-8")
        marks = list(re.finditer(r'^([ \t]+fingerprint:[ \t]*)("[0-9a-f]*"|[0-9a-f]*)[ \t]*$', text, re.M))
        if not marks:
            print(f"{path.name}: no fingerprint line in its history; release it with `specgen release`")
            continue
        last = marks[-1]
        new = text[: last.start()] + f'{last.group(1)}"{d.fingerprint}"' + text[last.end():]
        if new != text:
            write_atomic(path, new)
            print(f"{path.name}: recorded {d.fingerprint[:12]}")
        else:
            print(f"{path.name}: up to date")


if __name__ == "__main__":
    main()
