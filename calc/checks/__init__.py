"""Heat load, the cooling check with its limits, and scale-up."""
