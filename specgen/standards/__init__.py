"""Published tables the shop's rules rest on, kept as data beside their source, with small lookups.

No physics here and no heavy imports: the catalogue loader and the spec parser read these tables.
"""
