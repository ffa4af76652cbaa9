package dev.watcher.parse;

import dev.watcher.model.ParseSink;

/**
 * Numbers the segments of one source: a new segment starts when the iteration counter goes back (a solver
 * restarted from an earlier snapshot) or when the log declares a restart (a banner line, a reprinted
 * header). A restart is not an error. A segment is only announced once it would hold a record after
 * another one, so two restart banners in a row make one new segment, and a banner before the first
 * record makes none.
 */
final class Segments {

    private int segment;
    private long lastIter = Long.MIN_VALUE;
    private boolean recordsInSegment;

    /** The log declared a restart at {@code line}. */
    void declare(long line, String reason, ParseSink sink) {
        if (recordsInSegment) {
            segment++;
            recordsInSegment = false;
            sink.segment(segment, line, reason);
        }
        lastIter = Long.MIN_VALUE;
    }

    /** A record for {@code iter} is about to be emitted; returns its segment. */
    int before(long iter, long line, ParseSink sink) {
        if (recordsInSegment && iter < lastIter) {
            segment++;
            sink.segment(segment, line, "iteration counter went back from " + lastIter + " to " + iter);
        }
        recordsInSegment = true;
        lastIter = iter;
        return segment;
    }

    /** The last iteration emitted in this segment, or {@code Long.MIN_VALUE}. */
    long lastIter() {
        return lastIter;
    }
}
