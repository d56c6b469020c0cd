"""Uncertainty and sensitivity: input distributions, Sobol sampling, statistics and variance shares.

Owns: the distributions an input may be given (:mod:`.distributions`), scrambled Sobol samples
and the Saltelli design (:mod:`.sampling`), summary statistics and Sobol / local sensitivity
indices (:mod:`.statistics`), and the driver that pushes samples through any vectorised model
and keeps count of the samples that fail (:mod:`.propagation`).

Pure functions on numpy arrays: no physics, no units, no text. What an input means, its
bounds and its syntax live in :mod:`perfchain.inputs.uncertainty`; the models that turn
samples into outputs (an operating point, a vehicle) live where their physics is
(:mod:`perfchain.study.uncertainty`). May import only the base modules (errors).
"""
