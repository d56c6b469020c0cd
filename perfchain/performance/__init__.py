"""Performance of an operating point: the chain, delivered losses, separation, sizing.

Owns: the result record (:mod:`.result`: c*, Cf, vacuum and ambient Isp, stations), the chain
for one point (:mod:`.chain`) and for many (:mod:`.batched`, on the batch solver), results as
flat table rows (:mod:`.flat`, built straight from the batch solver's arrays), the general
path on pruned species sets (:mod:`.general`), named efficiency factors (:mod:`.loss_model`,
applied in :mod:`.losses`), the delivered, separation and sizing blocks (:mod:`.delivered`,
:mod:`.separation`, :mod:`.sizing`), and the ambient values that know about separation with
the one feasibility rule of every path (:mod:`.ambient`), and the thrust-chamber design of a
point: geometry, contour, gas along it and wall heat flux (:mod:`.chamber_design`).

Inside: separation <- ambient <- result <- general <- batched <- chain, flat <- batched, and result <- delivered
<- chain; nothing below imports what is above it.

May import: :mod:`perfchain.nozzle`, :mod:`perfchain.thermo`, :mod:`perfchain.propellants` and
the shared base modules (errors, units, constants, atmosphere).
"""
