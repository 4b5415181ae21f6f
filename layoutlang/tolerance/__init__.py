"""Tolerances and yield: perturb a layout as manufacturing would, compensate, judge every
built unit by the script's own expectations (model, sampling, perturb, evaluate, analysis,
run, command, worst)."""
