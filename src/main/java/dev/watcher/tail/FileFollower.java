package dev.watcher.tail;

import dev.watcher.model.TailPosition;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.nio.file.attribute.BasicFileAttributes;
import java.nio.file.attribute.FileTime;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.time.Duration;
import java.util.Arrays;
import java.util.HexFormat;
import java.util.Objects;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Follows one log file that another process is still writing, by polling its size and identity (shared
 * cluster filesystems deliver no change events for writes from other nodes).
 *
 * <p>Each {@link #poll} reads what is new and delivers the complete lines, in order; the unterminated tail is
 * held until its terminator arrives. {@code \n}, {@code \r\n} and a bare {@code \r} (progress lines) end a
 * line. A line longer than {@link TailOptions#maxLineBytes()} is cut and counted, a line with binary bytes is
 * skipped and counted, invalid UTF-8 is replaced and counted (each by a {@link TailNotice}).
 *
 * <ul>
 *   <li>The file shrank below the read position, or its first bytes changed: it was truncated; the held
 *       fragment is dropped and the file is read again from the start ({@link TailNotice.Kind#TRUNCATED}).</li>
 *   <li>Another file stands at the path (new {@code fileKey}): the old file's remaining bytes are read and
 *       its last fragment delivered, then the new file is followed from its start
 *       ({@link TailNotice.Kind#REPLACED}).</li>
 *   <li>The file disappeared: what remains of it is read, then the follower waits for the path to come back
 *       ({@link TailNotice.Kind#GONE}, then {@link TailNotice.Kind#APPEARED}). A file missing at start is
 *       waited for the same way.</li>
 *   <li>Resume: given the {@link TailPosition} of an earlier run whose file identity and first-bytes
 *       fingerprint still match, it continues at that offset and line number; otherwise it starts over from
 *       byte 0 and says so with a {@link TailNotice.Kind#REPLACED} notice.</li>
 * </ul>
 *
 * <p>Line numbers count per file from 1 and start over when the file is truncated or replaced. One poll reads
 * at most 16 MiB so a caller's loop stays responsive while catching up; {@link #nextDelay()} is then zero.
 *
 * <p>Not thread-safe: one thread polls. {@link #poll} never throws for trouble with the file.
 */
public final class FileFollower implements AutoCloseable {

    private static final Logger LOG = LoggerFactory.getLogger(FileFollower.class);
    private static final int FINGERPRINT_BYTES = 1024;
    private static final int CHUNK = 64 * 1024;
    private static final long POLL_BUDGET = 16L * 1024 * 1024;
    private static final long LOG_EVERY_NANOS = 60_000_000_000L;

    private final Path path;
    private final TailOptions options;
    private final LineSplitter splitter;
    private final byte[] buf = new byte[CHUNK];
    private final ByteBuffer bb = ByteBuffer.wrap(buf);

    private TailPosition resume;
    private FileChannel channel;
    private Object fileKey;
    private byte[] firstBytes = new byte[0];
    private long lastSize = -1;
    private FileTime lastModified;
    private boolean missingSeen;
    private boolean closed;

    private boolean moreNow;
    private int idlePolls;
    private boolean grewLastPoll;
    private long lastWarnNanos = System.nanoTime() - LOG_EVERY_NANOS;

    /**
     * @param path       the log file; it need not exist yet
     * @param resumeFrom where an earlier run stopped, or null to read from the start
     * @param options    line cap and poll intervals
     */
    public FileFollower(Path path, TailPosition resumeFrom, TailOptions options) {
        this.path = Objects.requireNonNull(path, "path");
        this.options = Objects.requireNonNull(options, "options");
        this.resume = resumeFrom;
        this.splitter = new LineSplitter(options.maxLineBytes(), path.toString());
        splitter.reset(0, 0, false);
    }

    /** The followed path. */
    public Path path() {
        return path;
    }

    /**
     * Reads what is new now and delivers complete lines to {@code h}, in order.
     *
     * @return the number of lines delivered by this call (skipped binary lines not counted)
     */
    public int poll(LineHandler h) {
        Objects.requireNonNull(h, "h");
        if (closed) {
            return 0;
        }
        long before = splitter.next();
        int delivered = 0;
        boolean progressed = false;
        moreNow = false;
        try {
            BasicFileAttributes a = attributes();
            if (a == null) {
                if (channel != null) {
                    delivered += finishOld(h);
                    h.notice(new TailNotice(TailNotice.Kind.GONE, splitter.lineNo(),
                            path + " disappeared; waiting for it to come back"));
                    splitter.reset(0, 0, false);
                    fileKey = null;
                    firstBytes = new byte[0];
                    progressed = true;
                }
                missingSeen = true;
                return delivered;
            }
            Object key = a.fileKey();
            if (channel != null && key != null && !key.equals(fileKey)) {
                delivered += finishOld(h);
                h.notice(new TailNotice(TailNotice.Kind.REPLACED, splitter.lineNo(),
                        path + " was replaced by another file; finished the old one, following the new one"));
                splitter.reset(0, 0, false);
                progressed = true;
            }
            if (channel == null) {
                open(a, h);
                before = splitter.next();
                progressed = true;
            }
            long size = channel.size();
            if (size < splitter.next()) {
                truncated(h, "shrank to " + size + " bytes, below the read position " + splitter.next());
            } else if ((size != lastSize || !a.lastModifiedTime().equals(lastModified)) && !firstBytesMatch(size)) {
                truncated(h, "was rewritten from its start");
            }
            lastSize = size;
            lastModified = a.lastModifiedTime();
            delivered += readTo(size, POLL_BUDGET, h);
            moreNow = splitter.next() < size;
            rememberFirstBytes(size);
            progressed |= splitter.next() != before;
        } catch (IOException | UncheckedIOException | SecurityException e) {
            // a stale handle or a permission change on a shared filesystem: keep going, try again next poll
            warn(e);
        } finally {
            grewLastPoll = progressed;
            idlePolls = progressed ? 0 : Math.min(idlePolls + 1, 30);
        }
        return delivered;
    }

    /**
     * Where this follower stands: the file's identity, the offset just after the last complete line, the
     * lines ended so far and a fingerprint of the file's first bytes. During {@link LineHandler#line} it
     * already includes the line being delivered. Before the file was first opened, the resume position given
     * to the constructor (or {@link TailPosition#START}).
     */
    public TailPosition position() {
        if (channel == null && resume != null) {
            return resume;
        }
        return new TailPosition(fileKey == null ? null : fileKey.toString(), splitter.committed(),
                splitter.lineNo(), fingerprint(firstBytes, firstBytes.length));
    }

    /**
     * True when the last poll read up to the end of the file as it was then (nothing seen is left unread):
     * the daemon is caught up with the file's history.
     */
    public boolean atEnd() {
        return !moreNow;
    }

    /** True when the last poll found nothing new (the caller may back off). */
    public boolean idle() {
        return !grewLastPoll && !moreNow;
    }

    /**
     * How long to wait before the next poll: zero while bytes already seen are still unread, the minimum
     * interval while the file grows, doubling up to the maximum while it is idle or missing.
     */
    public Duration nextDelay() {
        if (moreNow) {
            return Duration.ZERO;
        }
        Duration d = options.minPoll();
        for (int i = 0; i < idlePolls && d.compareTo(options.maxPoll()) < 0; i++) {
            d = d.multipliedBy(2);
        }
        return d.compareTo(options.maxPoll()) > 0 ? options.maxPoll() : d;
    }

    @Override
    public void close() {
        closed = true;
        closeChannel();
    }

    private BasicFileAttributes attributes() throws IOException {
        try {
            BasicFileAttributes a = Files.readAttributes(path, BasicFileAttributes.class);
            return a.isDirectory() ? null : a;
        } catch (NoSuchFileException e) {
            return null;
        }
    }

    private void open(BasicFileAttributes a, LineHandler h) throws IOException {
        channel = FileChannel.open(path, StandardOpenOption.READ);
        fileKey = a.fileKey();
        firstBytes = new byte[0];
        lastSize = -1;
        lastModified = null;
        long size = channel.size();
        TailPosition r = resume;
        resume = null;
        if (r != null && (r.offset() > 0 || r.lineNo() > 0)) {
            boolean keyOk = r.fileKey() == null || fileKey == null || r.fileKey().equals(fileKey.toString());
            boolean fingerprintOk = fingerprintMatches(r.fingerprint(), size);
            if (keyOk && fingerprintOk && size >= r.offset()) {
                boolean afterCr = r.offset() > 0 && byteAt(r.offset() - 1) == '\r';
                splitter.reset(r.offset(), r.lineNo(), afterCr);
                rememberFirstBytes(size);
                return;
            }
            h.notice(new TailNotice(TailNotice.Kind.REPLACED, 0, path + " is not the file of the saved position ("
                    + (keyOk ? "its first bytes or size differ" : "another file identity") + "); reading from the start"));
        }
        splitter.reset(0, 0, false);
        if (missingSeen) {
            h.notice(new TailNotice(TailNotice.Kind.APPEARED, 0, path + " appeared; reading from its start"));
            missingSeen = false;
        }
    }

    /** Reads the old file to its end and delivers its last fragment, then lets go of it. */
    private int finishOld(LineHandler h) throws IOException {
        int n = 0;
        try {
            n += readTo(channel.size(), Long.MAX_VALUE, h);
        } finally {
            n += splitter.finish(h);
            closeChannel();
        }
        return n;
    }

    private void truncated(LineHandler h, String why) {
        long lines = splitter.lineNo();
        splitter.reset(0, 0, false);
        firstBytes = new byte[0];
        h.notice(new TailNotice(TailNotice.Kind.TRUNCATED, lines, path + " " + why + "; reading again from the start"));
    }

    private int readTo(long size, long budget, LineHandler h) throws IOException {
        int delivered = 0;
        long pos = splitter.next();
        long left = budget;
        while (pos < size && left > 0) {
            bb.clear();
            bb.limit((int) Math.min(CHUNK, size - pos));
            int n = channel.read(bb, pos);
            if (n <= 0) {
                break;
            }
            delivered += splitter.feed(buf, 0, n, h);
            pos += n;
            left -= n;
        }
        return delivered;
    }

    private boolean firstBytesMatch(long size) throws IOException {
        if (firstBytes.length == 0) {
            return true;
        }
        if (size < firstBytes.length) {
            return false;
        }
        return Arrays.equals(firstBytes, readHead(firstBytes.length));
    }

    private void rememberFirstBytes(long size) throws IOException {
        int want = (int) Math.min(size, FINGERPRINT_BYTES);
        if (want > firstBytes.length) {
            firstBytes = readHead(want);
        }
    }

    private boolean fingerprintMatches(String fingerprint, long size) throws IOException {
        if (fingerprint == null || fingerprint.isEmpty()) {
            return true;
        }
        int colon = fingerprint.indexOf(':');
        int n;
        try {
            n = Integer.parseInt(fingerprint.substring(0, Math.max(colon, 0)));
        } catch (NumberFormatException e) {
            return false;
        }
        if (n < 0 || n > FINGERPRINT_BYTES || size < n) {
            return false;
        }
        byte[] head = readHead(n);
        return fingerprint.equals(fingerprint(head, head.length));
    }

    private byte[] readHead(int n) throws IOException {
        ByteBuffer b = ByteBuffer.allocate(n);
        while (b.hasRemaining()) {
            if (channel.read(b, b.position()) <= 0) {
                break;
            }
        }
        return b.position() == n ? b.array() : Arrays.copyOf(b.array(), b.position());
    }

    private int byteAt(long offset) throws IOException {
        ByteBuffer b = ByteBuffer.allocate(1);
        return channel.read(b, offset) == 1 ? b.get(0) : -1;
    }

    /** {@code N:hex}: the number of leading bytes hashed and their SHA-256. */
    static String fingerprint(byte[] head, int n) {
        try {
            MessageDigest md = MessageDigest.getInstance("SHA-256");
            md.update(head, 0, n);
            return n + ":" + HexFormat.of().formatHex(md.digest());
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException("every Java platform provides SHA-256", e);
        }
    }

    private void closeChannel() {
        if (channel != null) {
            try {
                channel.close();
            } catch (IOException e) {
                warn(e);
            }
            channel = null;
        }
    }

    private void warn(Exception e) {
        long now = System.nanoTime();
        if (now - lastWarnNanos >= LOG_EVERY_NANOS) {
            lastWarnNanos = now;
            LOG.warn("Reading {} failed, will try again: {}", path, e.toString());
        }
    }
}
