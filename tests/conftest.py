"""Test-session settings shared by every test module."""

from hypothesis import settings

# CI machines are shared and noisy: a property test fails on a wrong answer, never on
# a slow example.  Tests that set their own `settings` keep their example counts.
settings.register_profile("tubefuncs", deadline=None)
settings.load_profile("tubefuncs")
