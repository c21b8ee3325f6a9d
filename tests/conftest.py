"""Test-wide settings.

Under CI (the ``CI`` environment variable set, as ``.ci/run`` is run), hypothesis draws the same
examples every run (``derandomize``), so a green main stays green; on a developer's machine it
explores new examples each run, and whatever it finds becomes an ``@example`` in the test.
"""

import os

from hypothesis import settings

settings.register_profile("ci", derandomize=True, print_blob=True)
if os.environ.get("CI"):
    settings.load_profile("ci")
