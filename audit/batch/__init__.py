"""Audit a whole collection: one job per dataset, run by worker processes or a Dask
cluster through the same pure audit, with a collection index (:mod:`audit.batch.run`)."""
