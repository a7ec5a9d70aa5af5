"""Fitting measured plant data: the UA of a logged heat-up or cool-down, and the Wilson plot."""
