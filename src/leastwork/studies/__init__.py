"""Studies on a solved structure: influence lines, fit-up tolerances, reanalysis on the same layout, envelopes over combinations."""
