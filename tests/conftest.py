"""Shared test set-up: an isolated perception cache for every test session."""

from __future__ import annotations

import os
import tempfile

# Tests must never read or pollute the user's real cache.
os.environ.setdefault("HALOSIFT_CACHE_DIR", tempfile.mkdtemp(prefix="halosift-test-cache-"))
os.environ.setdefault("HALOSIFT_SESSION_DIR", tempfile.mkdtemp(prefix="halosift-test-sessions-"))
