package dev.watcher.tail;

import java.nio.file.Path;

/** Run in a child JVM with a small heap: follows, then reads, a file holding one huge unterminated line. */
public final class LongLineProbe {

    private LongLineProbe() {
    }

    public static void main(String[] args) throws Exception {
        Path p = Path.of(args[0]);
        RecordingHandler h = new RecordingHandler();
        try (FileFollower f = new FileFollower(p, null, TailOptions.DEFAULTS)) {
            do {
                f.poll(h);
            } while (f.nextDelay().isZero());
        }
        System.out.println("follow lines=" + h.lines.size() + " cut=" + h.count(TailNotice.Kind.LINE_CUT));
        RecordingHandler r = new RecordingHandler();
        long n = LogReader.readAll(p, r, TailOptions.DEFAULTS);
        System.out.println("read lines=" + n + " cut=" + r.count(TailNotice.Kind.LINE_CUT) + " last="
                + r.lines.get(r.lines.size() - 1).length());
    }
}
