package dev.watcher.tail;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;

/** Records what a reader delivers: lines (copied, as the contract asks), their numbers, and notices. */
final class RecordingHandler implements LineHandler {

    final List<String> lines = new CopyOnWriteArrayList<>();
    final List<Long> numbers = new CopyOnWriteArrayList<>();
    final List<TailNotice> notices = new CopyOnWriteArrayList<>();
    /** Lines and notices in the order they came, notices as {@code !KIND}. */
    final List<String> events = new CopyOnWriteArrayList<>();

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
        List<TailNotice.Kind> k = new ArrayList<>();
        for (TailNotice n : notices) {
            k.add(n.kind());
        }
        return k;
    }

    long count(TailNotice.Kind kind) {
        return notices.stream().filter(n -> n.kind() == kind).count();
    }
}
