"""The assembled heat-transfer network and the single-pass coolant balance."""
