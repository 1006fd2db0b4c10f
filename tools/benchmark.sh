#!/usr/bin/env bash
# Runs one benchmark from the core's test sources (benchmarks are not in the main jar):
#   tools/benchmark.sh org.stackwright.fft.FftBenchmark [its arguments]
# Set BENCH_JAVA_OPTS to change the JVM options (default -Xmx8g). Run from anywhere; works in the repository root.
# The class path is the core's classes, test classes and libraries, then the Spark runner (whose manifest names
# target/spark-lib/), for the benchmarks that compare with it (BlocksBenchmark --spark).
set -euo pipefail
cd "$(dirname "$0")/.."
mvn -B -q -DskipTests package
mvn -B -q -pl core dependency:build-classpath -Dmdep.outputFile="$PWD/target/benchmark-classpath.txt"
exec java ${BENCH_JAVA_OPTS:--Xmx8g} \
  -cp "target/classes:target/test-classes:$(cat target/benchmark-classpath.txt):target/stackwright-spark.jar" "$@"
