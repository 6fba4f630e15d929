"""How far plans under way have got, for the page to show ("solving arched bars: 12 of 49").

The page names each preview it asks for with a random id (the ``X-Cutplan-Job`` header) and
asks ``GET /progress?job=ID`` while it waits. Only counts are kept, for at most
:data:`MAX_JOBS` plans, and each is forgotten when its request ends.
"""

from __future__ import annotations

import re
import threading
from collections import OrderedDict

MAX_JOBS = 64
"""Plans whose progress is kept at once [-] (the oldest is forgotten first)."""
JOB_ID = re.compile(r"[A-Za-z0-9_-]{8,64}")
"""What a job id the page sends looks like."""

__all__ = ["JOB_ID", "MAX_JOBS", "ProgressBoard"]


class ProgressBoard:
    """Progress (done, total) of plans under way, by job id; safe to use from many threads."""

    def __init__(self):
        self._jobs = OrderedDict()
        self._lock = threading.Lock()

    def reporter(self, job):
        """A callable ``(done, total)`` that records the job's progress, or None for no valid id."""
        if not job or not JOB_ID.fullmatch(job):
            return None

        def report(done, total):
            with self._lock:
                self._jobs[job] = (int(done), int(total))
                self._jobs.move_to_end(job)
                while len(self._jobs) > MAX_JOBS:
                    self._jobs.popitem(last=False)

        return report

    def get(self, job):
        """(done, total) of the job, or None when it is unknown or finished."""
        with self._lock:
            return self._jobs.get(job)

    def finish(self, job):
        """Forget the job (its request has ended)."""
        with self._lock:
            self._jobs.pop(job, None)
