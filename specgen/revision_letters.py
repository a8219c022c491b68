"""Drawing revision letters (ASME Y14.35 practice, from memory): A..Y skipping I, O, Q, S, X, Z; then AA.

Kept dependency-free so the spec loader can validate a revision without importing the release code.
"""

ALPHABET = "ABCDEFGHJKLMNPRTUVWY"   # 20 letters: I, O, Q, S, X, Z are never used


def is_valid_revision(text: str) -> bool:
    return bool(text) and len(text) <= 4 and all(c in ALPHABET for c in text)


def revision_index(text: str) -> int:
    """0 for A, 19 for Y, 20 for AA: bijective base-20 numbering."""
    n = 0
    for c in text:
        n = n * len(ALPHABET) + ALPHABET.index(c) + 1
    return n - 1


def revision_from_index(index: int) -> str:
    n = index + 1
    out = ""
    while n > 0:
        n, rem = divmod(n - 1, len(ALPHABET))
        out = ALPHABET[rem] + out
    return out


def next_revision(text: str | None) -> str:
    if not text:
        return "A"
    return revision_from_index(revision_index(text) + 1)
