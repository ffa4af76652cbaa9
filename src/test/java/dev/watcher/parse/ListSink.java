package dev.watcher.parse;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import dev.watcher.model.ParseSink;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;

/** A parse sink that keeps everything it is given, in order, for tests. */
final class ListSink implements ParseSink {

    record Segment(int segment, long line, String reason) {
    }

    record Bad(Malformed kind, long line, String detail) {
    }

    final List<IterationRecord> records = new ArrayList<>();
    final List<Segment> segments = new ArrayList<>();
    final List<Bad> malformed = new ArrayList<>();
    /** Everything in arrival order, as short strings ("record 12", "segment 1", "malformed bad-number"). */
    final List<String> order = new ArrayList<>();

    @Override
    public void record(IterationRecord record) {
        records.add(record);
        order.add("record " + record.iter());
    }

    @Override
    public void segment(int segment, long line, String reason) {
        segments.add(new Segment(segment, line, reason));
        order.add("segment " + segment);
    }

    @Override
    public void malformed(Malformed kind, long line, String detail) {
        malformed.add(new Bad(kind, line, detail));
        order.add("malformed " + kind.id());
    }

    Map<Malformed, Integer> malformedByKind() {
        Map<Malformed, Integer> m = new EnumMap<>(Malformed.class);
        for (Bad b : malformed) {
            m.merge(b.kind(), 1, Integer::sum);
        }
        return m;
    }

    /** Feeds {@code lines} (numbered from 1) to {@code parser}, then flushes it. */
    static ListSink run(LineParser parser, String... lines) {
        ListSink sink = new ListSink();
        long n = 0;
        for (String l : lines) {
            parser.accept(l, ++n, sink);
        }
        parser.flush(sink);
        return sink;
    }
}
