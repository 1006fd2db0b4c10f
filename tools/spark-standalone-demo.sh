#!/usr/bin/env bash
# The Spark runner on a real, if small, Spark cluster on this one machine (not local mode): a standalone master and
# two workers, each a JVM of its own started from the jars in target/spark-lib/; the workers start the executors as
# JVMs of their own, which share the input and output paths with the driver (one file system). Then:
#   1. the single-machine block run (java -jar target/stackwright.jar deconvolve ... --block-size ...), the reference;
#   2. the same through 'java -jar target/stackwright-spark.jar --master spark://...', with one block task made to
#      fail once (Spark setting spark.stackwright.failOnce);
#   3. the same through Spark's own submit class (what spark-submit runs), with one executor JVM killed (kill -9)
#      while it works on its blocks;
# and prints, for each cluster run, the time, the blocks retried and the largest difference to the reference.
#
#   tools/spark-standalone-demo.sh [--size 256x256x32] [--block-size 128x64x32] [--iterations 20] [--port 17077]
#
# Builds the jars first when they are missing. Everything it makes is in target/spark-standalone/ (logs in logs/);
# the master, workers and executors are stopped at the end. Needs free ports PORT..PORT+3 on 127.0.0.1.
set -euo pipefail
cd "$(dirname "$0")/.."
ROOT=$(pwd)
SIZE=256x256x32
BLOCK=128x64x32
ITER=20
PORT=17077
while [ $# -gt 0 ]; do
  case "$1" in
    --size) SIZE=$2; shift 2 ;;
    --block-size) BLOCK=$2; shift 2 ;;
    --iterations) ITER=$2; shift 2 ;;
    --port) PORT=$2; shift 2 ;;
    *) echo "unknown argument $1" >&2; exit 2 ;;
  esac
done
if [ ! -f target/stackwright-spark.jar ] || [ ! -f target/spark-lib/stackwright.jar ]; then
  mvn -B -q -DskipTests package
fi
MASTER=spark://127.0.0.1:$PORT
WORK=$ROOT/target/spark-standalone
LOGS=$WORK/logs
rm -rf "$WORK"
mkdir -p "$WORK/spark-home" "$LOGS" "$WORK/executors" "$WORK/local"
# A worker starts executors with the jars of SPARK_HOME/jars on their class path: here, target/spark-lib/.
ln -s "$ROOT/target/spark-lib" "$WORK/spark-home/jars"
export SPARK_HOME=$WORK/spark-home SPARK_SCALA_VERSION=2.13 SPARK_LOCAL_IP=127.0.0.1 SPARK_LOCAL_DIRS=$WORK/local
# What Spark needs of the JDK on Java 17 (as its own launch scripts give it).
OPENS=()
for p in java.lang java.lang.invoke java.lang.reflect java.io java.net java.nio java.util java.util.concurrent \
    java.util.concurrent.atomic jdk.internal.ref sun.nio.ch sun.nio.cs sun.security.action sun.util.calendar; do
  OPENS+=("--add-opens=java.base/$p=ALL-UNNAMED")
done
OPENS+=(-Dio.netty.tryReflectionSetAccessible=true)

SERVERS=()
stop_all() {
  # the executors first (children of the workers), then the workers and the master: only what this script started
  for s in "${SERVERS[@]}"; do
    for c in $(pgrep -P "$s" || true); do kill "$c" 2>/dev/null || true; done
  done
  for s in "${SERVERS[@]}"; do kill "$s" 2>/dev/null || true; done
  for s in "${SERVERS[@]}"; do wait "$s" 2>/dev/null || true; done
}
trap stop_all EXIT

# wait_for FILE TEXT SECONDS
wait_for() {
  local t=0
  until grep -q "$2" "$1" 2>/dev/null; do
    sleep 1
    t=$((t + 1))
    if [ "$t" -ge "$3" ]; then
      echo "no '$2' in $1 after $3 s:" >&2
      tail -20 "$1" >&2
      exit 1
    fi
  done
}

seconds() { date +%s.%N; }
elapsed() { awk -v a="$1" -v b="$(seconds)" 'BEGIN { printf "%.1f", b - a }'; }

echo "== a standalone Spark cluster on 127.0.0.1: one master, two workers of one core each"
java -Xmx256m "${OPENS[@]}" -cp "target/spark-lib/*" org.apache.spark.deploy.master.Master \
  --host 127.0.0.1 --port "$PORT" --webui-port $((PORT + 1)) >"$LOGS/master.log" 2>&1 &
SERVERS+=($!)
wait_for "$LOGS/master.log" "I have been elected leader" 120
WORKERS=()
for n in 1 2; do
  java -Xmx256m "${OPENS[@]}" -cp "target/spark-lib/*" org.apache.spark.deploy.worker.Worker "$MASTER" \
    --host 127.0.0.1 --cores 1 --memory 1500m --work-dir "$WORK/executors/worker-$n" --webui-port $((PORT + 1 + n)) \
    >"$LOGS/worker-$n.log" 2>&1 &
  SERVERS+=($!)
  WORKERS+=($!)
done
for n in 1 2; do
  wait_for "$LOGS/worker-$n.log" "Successfully registered with master" 120
done
echo "master $MASTER, workers: pids ${WORKERS[*]}"

echo "== an invented stack ($SIZE) and its PSF"
java -jar target/stackwright.jar simulate --size "$SIZE" --bits 16 --seed 5 --output "$WORK/stack.tif" \
  --psf-output "$WORK/psf.tif" >"$LOGS/simulate.log" 2>&1
OPTS=(--input "$WORK/stack.tif" --psf "$WORK/psf.tif" --block-size "$BLOCK" --iterations "$ITER" --stop fixed)

echo "== 1. one machine, blocks $BLOCK, $ITER iterations"
t0=$(seconds)
java -Xmx1g -jar target/stackwright.jar deconvolve "${OPTS[@]}" --output "$WORK/one.tif" \
  --record "$WORK/one.json" >"$LOGS/one.log" 2>&1
echo "time $(elapsed "$t0") s"

echo "== 2. java -jar target/stackwright-spark.jar --master $MASTER, block 3 made to fail once"
t0=$(seconds)
java -Xmx1g -Dspark.executor.memory=1g -Dspark.ui.enabled=false -Dspark.stackwright.failOnce=3 \
  -jar target/stackwright-spark.jar --master "$MASTER" deconvolve "${OPTS[@]}" --output "$WORK/cluster-jar.tif" \
  --record "$WORK/cluster-jar.json" >"$LOGS/cluster-jar.log" 2>&1
echo "time $(elapsed "$t0") s; $(grep -o '"block_tasks": [0-9]*' "$WORK/cluster-jar.json"),"\
" $(grep -o '"blocks_retried": [0-9]*' "$WORK/cluster-jar.json")"
java -cp target/stackwright.jar tools/spark-standalone/MaxDifference.java "$WORK/one.tif" "$WORK/cluster-jar.tif"

echo "== 3. Spark's submit class, one executor killed while it works"
t0=$(seconds)
java -Xmx1g "${OPENS[@]}" -cp "target/spark-lib/*" org.apache.spark.deploy.SparkSubmit --master "$MASTER" \
  --class org.stackwright.spark.SparkMain --jars target/spark-lib/stackwright.jar \
  --conf spark.executor.memory=1g --conf spark.ui.enabled=false \
  target/stackwright-spark.jar deconvolve "${OPTS[@]}" --output "$WORK/cluster-submit.tif" \
  --record "$WORK/cluster-submit.json" >"$LOGS/cluster-submit.log" 2>&1 &
RUN=$!
# an executor JVM of this run that is working on a block: its log (in its worker's folder, under the run's
# application id) says "Running task"; killed a few seconds into its task
wait_for "$LOGS/cluster-submit.log" "Connected to Spark cluster with app ID" 300
APP=$(grep -o "Connected to Spark cluster with app ID app-[0-9-]*" "$LOGS/cluster-submit.log" | awk '{print $NF}')
VICTIM=""
for i in $(seq 1 600); do
  for n in 1 2; do
    if grep -qs "Running task" "$WORK"/executors/worker-$n/"$APP"/*/stderr; then
      VICTIM=$(pgrep -P "${WORKERS[$((n - 1))]}" | head -1 || true)
      [ -n "$VICTIM" ] && break 2
    fi
  done
  kill -0 "$RUN" 2>/dev/null || break
  sleep 0.5
done
sleep 3
if [ -n "$VICTIM" ] && kill -0 "$RUN" 2>/dev/null; then
  kill -9 "$VICTIM"
  echo "killed executor JVM $VICTIM (worker $n) in its first task, $(elapsed "$t0") s into the run"
else
  echo "no executor was running a task to kill" >&2
fi
if ! wait "$RUN"; then
  echo "the run failed; see $LOGS/cluster-submit.log" >&2
  tail -30 "$LOGS/cluster-submit.log" >&2
  exit 1
fi
echo "time $(elapsed "$t0") s; $(grep -o '"block_tasks": [0-9]*' "$WORK/cluster-submit.json"),"\
" $(grep -o '"blocks_retried": [0-9]*' "$WORK/cluster-submit.json")"
grep -h "Lost executor\|Lost task" "$LOGS/cluster-submit.log" | cut -c1-160 | head -3 || true
java -cp target/stackwright.jar tools/spark-standalone/MaxDifference.java "$WORK/one.tif" "$WORK/cluster-submit.tif"
