package dev.watcher.tail;

import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Objects;

/**
 * Reads a whole finished log, fast, for replay: large buffered reads and byte-level line splitting, with the
 * same line rules as {@link FileFollower} (terminators {@code \n}, {@code \r\n}, bare {@code \r}; long lines
 * cut, binary lines skipped, bad UTF-8 replaced, each reported as a {@link TailNotice}). An unterminated last
 * line is delivered, since the file is finished. ASCII lines reach the handler as a reusable view over the
 * read buffer, without a String being built.
 */
public final class LogReader {

    private static final int BUFFER = 1 << 20;

    private LogReader() {
    }

    /**
     * Delivers every line of {@code p} to {@code h}, in order, on the calling thread.
     *
     * @return the number of lines delivered
     * @throws IOException when the file cannot be opened or read (a missing file, for example)
     */
    public static long readAll(Path p, LineHandler h, TailOptions o) throws IOException {
        Objects.requireNonNull(h, "h");
        LineSplitter s = new LineSplitter(o.maxLineBytes(), p.toString());
        byte[] buf = new byte[BUFFER];
        long n = 0;
        try (InputStream in = Files.newInputStream(p)) {
            int r;
            while ((r = in.readNBytes(buf, 0, buf.length)) > 0) {
                n += s.feed(buf, 0, r, h);
            }
        }
        return n + s.finish(h);
    }
}
