"""Vessel description: bottom heads, geometry of fill, jacket and coils, agitation."""
