package org.stackwright.parallel;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.atomic.AtomicInteger;

/**
 * The caller's choice of parallelism: a fixed number of worker threads that run loops split into ranges.
 *
 * <p>Work is split into a fixed number of blocks that does not depend on the thread count, and reductions combine
 * the per-block partial results in block order. So results are bit-identical for any thread count, and repeat
 * runs are bit-identical too. One instance per run; {@link #close()} stops its threads.
 */
public final class Workers implements AutoCloseable {

    /** A loop body over the half-open index range [from, to). */
    @FunctionalInterface
    public interface RangeBody {
        void run(int from, int to);
    }

    /** A loop body over [from, to) that returns a partial sum. */
    @FunctionalInterface
    public interface RangeSum {
        double sum(int from, int to);
    }

    /** A loop body over [from, to) that also gets the index of the worker slot (for per-thread buffers). */
    @FunctionalInterface
    public interface SlotBody {
        void run(int slot, int from, int to);
    }

    /** A loop body for one block of a fixed cut (see {@link #forEachBlock}). */
    @FunctionalInterface
    public interface BlockBody {
        void run(int block);
    }

    /** Number of blocks a reduction is split into, whatever the thread count (keeps sums deterministic). */
    public static final int REDUCTION_BLOCKS = 64;

    private static final AtomicInteger POOL_COUNT = new AtomicInteger();

    private final int threads;
    private final ExecutorService pool;

    /**
     * @param threads number of threads, at least 1; 1 runs everything on the calling thread
     * @throws IllegalArgumentException if threads is below 1
     */
    public Workers(int threads) {
        if (threads < 1) {
            throw new IllegalArgumentException("threads must be at least 1 (given " + threads + ")");
        }
        this.threads = threads;
        if (threads == 1) {
            pool = null;
        } else {
            int id = POOL_COUNT.incrementAndGet();
            AtomicInteger n = new AtomicInteger();
            pool = Executors.newFixedThreadPool(threads, r -> {
                Thread t = new Thread(r, "stackwright-" + id + "-" + n.incrementAndGet());
                t.setDaemon(true);
                return t;
            });
        }
    }

    /** Workers with one thread per available processor. */
    public static Workers allCores() {
        return new Workers(Runtime.getRuntime().availableProcessors());
    }

    /** @return the number of threads */
    public int threads() {
        return threads;
    }

    /** Runs body over [0, n) split into contiguous ranges, one per thread, and waits for all. */
    public void forRange(int n, RangeBody body) {
        forSlots(n, (slot, from, to) -> body.run(from, to));
    }

    /**
     * Runs body over [0, n) split into at most {@link #threads()} contiguous ranges; the slot index (0 to
     * threads-1) lets the body use a per-thread work buffer.
     */
    public void forSlots(int n, SlotBody body) {
        if (n <= 0) {
            return;
        }
        int parts = Math.min(threads, n);
        if (parts == 1 || pool == null) {
            body.run(0, 0, n);
            return;
        }
        List<Future<?>> futures = new ArrayList<>(parts);
        for (int p = 0; p < parts; p++) {
            final int slot = p;
            final int from = (int) ((long) n * p / parts);
            final int to = (int) ((long) n * (p + 1) / parts);
            futures.add(pool.submit(() -> body.run(slot, from, to)));
        }
        waitAll(futures);
    }

    /**
     * Runs body for blocks 0 to blocks-1, each exactly once, and waits for all. The threads take the next block as
     * they become free, so blocks that cost more than others (the image's rows in a pass over a padded grid) do not
     * leave a thread idle; a result kept per block and combined in block order is the same for any thread count.
     */
    public void forEachBlock(int blocks, BlockBody body) {
        if (blocks <= 0) {
            return;
        }
        int parts = Math.min(threads, blocks);
        if (parts == 1 || pool == null) {
            for (int b = 0; b < blocks; b++) {
                body.run(b);
            }
            return;
        }
        AtomicInteger next = new AtomicInteger();
        List<Future<?>> futures = new ArrayList<>(parts);
        for (int p = 0; p < parts; p++) {
            futures.add(pool.submit(() -> {
                for (int b = next.getAndIncrement(); b < blocks; b = next.getAndIncrement()) {
                    body.run(b);
                }
            }));
        }
        waitAll(futures);
    }

    /**
     * Sums body over [0, n): the range is cut into {@link #REDUCTION_BLOCKS} blocks independent of the thread
     * count, and the block sums are added in order, so the result does not depend on the number of threads.
     */
    public double sum(int n, RangeSum body) {
        if (n <= 0) {
            return 0;
        }
        int blocks = Math.min(REDUCTION_BLOCKS, n);
        double[] partial = new double[blocks];
        forEachBlock(blocks, b -> {
            int from = (int) ((long) n * b / blocks);
            int to = (int) ((long) n * (b + 1) / blocks);
            partial[b] = body.sum(from, to);
        });
        double s = 0;
        for (double v : partial) {
            s += v;
        }
        return s;
    }

    private static void waitAll(List<Future<?>> futures) {
        RuntimeException failure = null;
        for (Future<?> f : futures) {
            try {
                f.get();
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                futures.forEach(g -> g.cancel(true));
                throw new CancelledException("interrupted");
            } catch (ExecutionException e) {
                Throwable cause = e.getCause();
                if (failure == null) {
                    failure = cause instanceof RuntimeException re ? re : new IllegalStateException(cause);
                }
                if (cause instanceof Error err) {
                    throw err;
                }
            }
        }
        if (failure != null) {
            throw failure;
        }
    }

    @Override
    public void close() {
        if (pool != null) {
            pool.shutdownNow();
        }
    }
}
