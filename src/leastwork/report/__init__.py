"""Output of a solution: JSON (contract) and the terminal summary."""
