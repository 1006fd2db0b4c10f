#!/usr/bin/env bash
# Runs one benchmark from the test sources (benchmarks are not in the main jar):
#   tools/benchmark.sh org.stackwright.fft.FftBenchmark [its arguments]
# Set BENCH_JAVA_OPTS to change the JVM options (default -Xmx8g). Run from anywhere; works in the repository root.
set -euo pipefail
cd "$(dirname "$0")/.."
mvn -B -q -DskipTests package
mvn -B -q dependency:build-classpath -Dmdep.outputFile=target/benchmark-classpath.txt
exec java ${BENCH_JAVA_OPTS:--Xmx8g} -cp "target/classes:target/test-classes:$(cat target/benchmark-classpath.txt)" "$@"
