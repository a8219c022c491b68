"""Shared test helpers."""

import re


def blank_recorded_fingerprint(text: str) -> str:
    """The shipped demo specs record their release fingerprints; tests that release or tamper with a
    copy start from a release that recorded none (as a spec released before specgen would be)."""
    return re.sub(r'^(\s+fingerprint:\s*)"[0-9a-f]{64}"', r'\1""', text, flags=re.M)
