"""Film and wall resistances: process side, jacket channels, coil tubes, wall and fouling."""
