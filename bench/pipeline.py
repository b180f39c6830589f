"""The baseline of `make bench`: a one-way ANOVA the way it is commonly done in Python,
pandas.read_csv to load the file and scipy.stats.f_oneway for the F test.

    /usr/bin/python3 bench/pipeline.py DATA.csv FACTOR_COLUMN RESPONSE_COLUMN

Prints "F P" (repr of each double) on standard output, and the time spent importing,
reading and testing on standard error.
"""
import sys
import time

t0 = time.perf_counter()
import pandas as pd
from scipy import stats
t1 = time.perf_counter()


def main(path, factor, response):
    frame = pd.read_csv(path, usecols=[factor, response])
    t2 = time.perf_counter()
    groups = [g.to_numpy() for _, g in frame.groupby(factor, sort=True)[response]]
    result = stats.f_oneway(*groups)
    t3 = time.perf_counter()
    print(repr(float(result.statistic)), repr(float(result.pvalue)))
    sys.stderr.write("pipeline: import %.3f s, read_csv %.3f s, group + f_oneway %.3f s\n"
                     % (t1 - t0, t2 - t1, t3 - t2))


if __name__ == "__main__":
    if len(sys.argv) != 4:
        sys.exit("usage: pipeline.py DATA.csv FACTOR_COLUMN RESPONSE_COLUMN")
    main(*sys.argv[1:])
