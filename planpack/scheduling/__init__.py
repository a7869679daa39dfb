"""Channel scheduling for an HF net: per-link choices, the shared net
schedule, gaps, ALE scan lists and hour labels.

Import the public functions from :mod:`planpack.schedule`.
"""
