package dev.watcher.tail;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

/** Records what a reader delivers: lines (copied, as the contract asks), their numbers, and notices. */
final class RecordingHandler implements LineHandler {

    final List<String> lines = Collections.synchronizedList(new ArrayList<>());
    final List<Long> numbers = Collections.synchronizedList(new ArrayList<>());
    final List<TailNotice> notices = Collections.synchronizedList(new ArrayList<>());
    /** Lines and notices in the order they came, notices as {@code !KIND}. */
    final List<String> events = Collections.synchronizedList(new ArrayList<>());

    @Override
    public void line(CharSequence line, long lineNo) {
        String s = line.toString();
        lines.add(s);
        numbers.add(lineNo);
        events.add(s);
    }

    @Override
    public void notice(TailNotice n) {
        notices.add(n);
        events.add("!" + n.kind());
    }

    List<TailNotice.Kind> kinds() {
        synchronized (notices) {
            List<TailNotice.Kind> k = new ArrayList<>();
            for (TailNotice n : notices) {
                k.add(n.kind());
            }
            return k;
        }
    }

    long count(TailNotice.Kind kind) {
        return kinds().stream().filter(k -> k == kind).count();
    }
}
