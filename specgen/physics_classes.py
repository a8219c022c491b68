"""IEC 60085 thermal classes, kept apart from physics/ so the catalogue loader needs no numpy."""

IEC_60085 = {90: "Y", 105: "A", 120: "E", 130: "B", 155: "F", 180: "H", 200: "N", 220: "R"}
