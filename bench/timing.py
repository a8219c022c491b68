"""Wall-clock timing of fresh processes, shared by the benchmark scripts."""

import os
import statistics
import subprocess
import time

# a user's machine keeps bytecode caches; measure with them even where this shell disables writing them
ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}


def wall(cmd: list, runs: int = 7, env=None) -> float:
    """Median wall time of ``runs`` fresh runs of ``cmd`` after one warm-up run."""
    env = env or ENV
    subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env, check=False)
    times = []
    for _ in range(runs):
        t = time.perf_counter()
        subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env, check=False)
        times.append(time.perf_counter() - t)
    return statistics.median(times)
