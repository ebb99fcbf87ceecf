"""Benchmarks of pinchk: scripts that print figures (never timed assertions in the test suite)."""
