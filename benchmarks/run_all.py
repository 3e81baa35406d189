"""Run every benchmark (apart from the test suite): `make bench`."""
import bench_positions

if __name__ == "__main__":
    bench_positions.main()
