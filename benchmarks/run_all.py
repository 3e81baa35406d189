"""Run every benchmark (apart from the test suite): `make bench`.

Each prints its figures as ratios against astropy (or the greedy baseline) measured in this
one process; nothing here asserts a time.
"""
import importlib
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).parent))
BENCHMARKS = ("bench_positions", "bench_windows", "bench_plan", "bench_schedule",
              "bench_output", "bench_batch", "bench_startup", "bench_events")

if __name__ == "__main__":
    for name in BENCHMARKS:
        if not (Path(__file__).parent / f"{name}.py").exists():
            print(f"({name}: not present)")
            continue
        print(f"== {name}")
        importlib.import_module(name).main()
        print()
