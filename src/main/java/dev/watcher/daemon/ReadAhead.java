package dev.watcher.daemon;

import dev.watcher.model.Detection;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import dev.watcher.model.ParseSink;
import dev.watcher.tail.LineHandler;
import dev.watcher.tail.TailNotice;
import java.io.IOException;
import java.io.InterruptedIOException;
import java.io.UncheckedIOException;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.ArrayBlockingQueue;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;

/**
 * Reads and parses one run's lines on a reader thread while the calling thread (the run's thread) takes
 * what the parser made through the rest of the pipeline (joiner, detectors, rules, outputs). The two hand
 * over in batches of up to {@value #BATCH} items through a small ring of reused batches, so the
 * synchronization is paid once per batch, memory in flight is bounded, and the items (records, segment
 * markers, malformed lines, the reader's notices) reach the pipeline in exactly the order the single-threaded
 * path ({@link RunPipeline#line}) would give them: the same input gives the same timeline.
 *
 * <p>The parser of a source is used only by the reader thread while {@link #run} is in progress and only by
 * the run's thread otherwise ({@link RunPipeline#flush}); the hand-over through the queues orders the two.
 * One {@code run} at a time; not thread-safe otherwise.
 */
final class ReadAhead implements AutoCloseable {

    /** Items per batch: large enough to amortize a hand-over, small enough to keep both threads busy. */
    static final int BATCH = 1024;
    /** Batches in the ring (in flight at most): one being filled, one being taken, two queued. */
    private static final int RING = 4;

    private static final byte RECORD = 0;
    private static final byte SEGMENT = 1;
    private static final byte MALFORMED = 2;
    private static final byte NOTICE = 3;

    /** What a source reads: a whole file, or one poll of a follower. Lines go to the handler in order. */
    @FunctionalInterface
    interface Source {
        void read(LineHandler h) throws IOException;
    }

    private final RunPipeline pipeline;
    private final int batch;
    private final ExecutorService reader;
    private final BlockingQueue<Batch> free = new ArrayBlockingQueue<>(RING);
    private final BlockingQueue<Batch> full = new ArrayBlockingQueue<>(RING);
    private volatile boolean cancelled;

    ReadAhead(RunPipeline pipeline) {
        this(pipeline, BATCH);
    }

    /** With {@code batch} items (or lines) per hand-over; tests use small batches to cross many boundaries. */
    ReadAhead(RunPipeline pipeline, int batch) {
        if (batch < 1) {
            throw new IllegalArgumentException("batch must be at least 1, got " + batch);
        }
        this.pipeline = pipeline;
        this.batch = batch;
        this.reader = Executors.newSingleThreadExecutor(r -> {
            Thread t = new Thread(r, "watcher-read-" + pipeline.run());
            t.setDaemon(true);
            return t;
        });
        for (int i = 0; i < RING; i++) {
            free.add(new Batch(batch));
        }
    }

    /**
     * Reads {@code src} as source number {@code source} of the run: the reader thread reads and parses, this
     * thread applies. Returns when every line the source delivered has gone through the pipeline.
     *
     * @throws IOException what the source threw, after everything read before it was applied
     */
    void run(int source, Source src) throws IOException {
        cancelled = false;
        RunPipeline.Lane lane = pipeline.lendLane();
        try {
            runWith(source, src, lane);
        } finally {
            if (lane != null) {
                pipeline.returnLane(); // the reader thread has handed over its last batch: the lane is back
            }
        }
    }

    private void runWith(int source, Source src, RunPipeline.Lane lane) throws IOException {
        reader.execute(new Producer(pipeline.parser(source), src, lane));
        boolean ended = false;
        try {
            while (true) {
                Batch b = take(full);
                try {
                    apply(source, b);
                    if (b.last) {
                        ended = true;
                        rethrow(b.error);
                        return;
                    }
                } finally {
                    b.clear();
                    free.add(b);
                }
            }
        } finally {
            if (!ended) {
                // this thread failed while applying: stop the reader and wait for its last batch, so the
                // parser is no longer in use and the ring is whole again
                cancelled = true;
                drain();
            }
        }
    }

    private void apply(int source, Batch b) {
        pipeline.linesRead(b.lines);
        RunPipeline p = pipeline;
        byte[] kind = b.kind;
        Object[] item = b.item;
        long[] line = b.line;
        for (int i = 0, n = b.size; i < n; i++) {
            switch (kind[i]) {
                case RECORD -> {
                    if (b.extra[i] == NOT_LENT) {
                        p.parsed(source, (IterationRecord) item[i]);
                    } else {
                        p.parsed((IterationRecord) item[i], detections(b.extra[i]));
                    }
                }
                case SEGMENT -> p.segmentParsed(b.number[i], line[i], (String) item[i], detections(b.extra[i]));
                case MALFORMED -> {
                    Bad bad = (Bad) item[i];
                    p.malformed(bad.kind(), line[i], bad.detail());
                }
                default -> Daemon.tailNotice(p, (TailNotice) item[i]);
            }
        }
    }

    /** Marks an item whose record the lent detectors did not see (no lane). */
    private static final Object NOT_LENT = new Object();

    @SuppressWarnings("unchecked")
    private static List<Detection> detections(Object extra) {
        return extra == NOT_LENT ? null : (List<Detection>) extra;
    }

    private void drain() {
        while (true) {
            Batch b = uninterruptibly(full::take);
            boolean last = b.last;
            b.clear();
            free.add(b);
            if (last) {
                return;
            }
        }
    }

    /** A blocking queue operation that an interrupt cannot break off. */
    private interface Wait<T> {
        T call() throws InterruptedException;
    }

    /**
     * Runs {@code w} until it completes, however often the thread is interrupted meanwhile; an interrupt is
     * kept and passed on afterwards. For the waits that must end for the ring of batches to come back whole.
     */
    private static <T> T uninterruptibly(Wait<T> w) {
        boolean interrupted = false;
        try {
            while (true) {
                try {
                    return w.call();
                } catch (InterruptedException e) {
                    interrupted = true;
                }
            }
        } finally {
            if (interrupted) {
                Thread.currentThread().interrupt();
            }
        }
    }

    private static Batch take(BlockingQueue<Batch> q) throws InterruptedIOException {
        try {
            return q.take();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new InterruptedIOException("interrupted while reading the log");
        }
    }

    private static void rethrow(Throwable t) throws IOException {
        if (t == null) {
            return;
        }
        if (t instanceof IOException io) {
            throw io;
        }
        if (t instanceof RuntimeException r) {
            throw r;
        }
        if (t instanceof Error e) {
            throw e;
        }
        throw new IllegalStateException(t);
    }

    /** Stops the reader thread (after the run in progress, if any). */
    @Override
    public void close() {
        reader.shutdown();
    }

    /** A malformed line's kind and detail (rare: one small object each). */
    private record Bad(Malformed kind, String detail) {
    }

    /** One hand-over: parallel arrays of items in order, and how many lines they came from. */
    private static final class Batch {
        private final int capacity;
        byte[] kind;
        Object[] item;
        /** Per record or segment item: what the lent detectors emitted (null for nothing, or NOT_LENT). */
        Object[] extra;
        long[] line;
        int[] number;
        int size;
        long lines;
        boolean last;
        Throwable error;

        Batch(int capacity) {
            this.capacity = capacity;
            allocate();
        }

        private void allocate() {
            kind = new byte[capacity];
            item = new Object[capacity];
            extra = new Object[capacity];
            line = new long[capacity];
            number = new int[capacity];
        }

        void add(byte k, Object o, long lineNo, int num) {
            if (size == kind.length) {
                int cap = Math.max(2, size * 2);
                kind = Arrays.copyOf(kind, cap);
                item = Arrays.copyOf(item, cap);
                extra = Arrays.copyOf(extra, cap);
                line = Arrays.copyOf(line, cap);
                number = Arrays.copyOf(number, cap);
            }
            kind[size] = k;
            item[size] = o;
            extra[size] = NOT_LENT;
            line[size] = lineNo;
            number[size] = num;
            size++;
        }

        void clear() {
            Arrays.fill(item, 0, size, null);
            Arrays.fill(extra, 0, size, null);
            if (kind.length > 4 * capacity) {
                allocate(); // a line that made a great many items (a long redrawn progress line) grew it
            }
            size = 0;
            lines = 0;
            last = false;
            error = null;
        }
    }

    /** The reader thread's side: lines in, parsed items out, a batch at a time. */
    private final class Producer implements Runnable, LineHandler, ParseSink {
        private final LineParser parser;
        private final Source src;
        /** The pipeline's lent detectors, run here right after parsing; null when none were lent. */
        private final RunPipeline.Lane lane;
        private Batch b;

        Producer(LineParser parser, Source src, RunPipeline.Lane lane) {
            this.parser = parser;
            this.src = src;
            this.lane = lane;
        }

        @Override
        public void run() {
            Throwable error = null;
            try {
                b = takeFree();
                src.read(this);
            } catch (Cancelled c) {
                // the run's thread gave up; it waits for the last batch below
            } catch (UncheckedIOException e) {
                error = e.getCause();
            } catch (Throwable t) {
                error = t;
            } finally {
                if (b == null) {
                    b = takeFree();
                }
                b.last = true;
                b.error = error;
                putFull(b);
                b = null;
            }
        }

        @Override
        public void line(CharSequence line, long lineNo) {
            if (cancelled) {
                throw Cancelled.INSTANCE;
            }
            b.lines++;
            parser.accept(line, lineNo, this);
            if (b.size >= batch || b.lines >= batch) {
                putFull(b);
                b = takeFree();
            }
        }

        @Override
        public void notice(TailNotice n) {
            b.add(NOTICE, n, n.lineNo(), 0);
        }

        @Override
        public void record(IterationRecord record) {
            b.add(RECORD, record, 0, 0);
            if (lane != null) {
                b.extra[b.size - 1] = lane.record(record);
            }
        }

        @Override
        public void segment(int segment, long line, String reason) {
            b.add(SEGMENT, reason, line, segment);
            if (lane != null) {
                b.extra[b.size - 1] = lane.segment(segment);
            }
        }

        @Override
        public void malformed(Malformed kind, long line, String detail) {
            b.add(MALFORMED, new Bad(kind, detail), line, 0);
        }

        // The ring always comes back whole (the run's thread returns every batch it takes, and drains when it
        // gives up), so these waits end; an interrupt of the reader thread is kept and passed on afterwards.
        private Batch takeFree() {
            return uninterruptibly(free::take);
        }

        private void putFull(Batch x) {
            uninterruptibly(() -> {
                full.put(x);
                return x;
            });
        }
    }

    /** Unwinds the reader when the run's thread gave up. */
    private static final class Cancelled extends RuntimeException {
        static final Cancelled INSTANCE = new Cancelled();

        private Cancelled() {
            super("cancelled", null, false, false);
        }
    }
}
