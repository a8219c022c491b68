"""Orchestration: the spec model, the layer build, the Design result and its checks.

``design(spec, catalog) -> Design`` is the one calculation every document reads.
"""
