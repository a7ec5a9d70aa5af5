"""Benchmark and load scripts (run as scripts; see bench.py and load.py) and their shared example requests."""
