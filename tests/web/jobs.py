"""Light jobs for worker processes in the web tests.

A worker process imports the module of the function it is given; this one imports only the
standard library's ``time``, so a pool started with ``warm=False`` runs these without loading the
planner or the web framework.
"""

import time


def counting(n, report):
    """A job for a worker process: reports 1..n of n, then returns n."""
    for k in range(1, n + 1):
        report(k, n)
    return n


def holding(seconds, report):
    """A job for a worker process: reports 1 of 1 as it starts, then holds its worker ``seconds``."""
    report(1, 1)
    time.sleep(seconds)
