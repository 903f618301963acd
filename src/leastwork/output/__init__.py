"""Outputs: the calculation sheet as data, the audit trail, and the output units and numbers every report shares."""
