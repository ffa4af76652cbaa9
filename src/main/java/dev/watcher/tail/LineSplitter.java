package dev.watcher.tail;

import java.lang.invoke.MethodHandles;
import java.lang.invoke.VarHandle;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.CharBuffer;
import java.nio.charset.CharsetDecoder;
import java.nio.charset.CoderResult;
import java.nio.charset.CodingErrorAction;
import java.nio.charset.StandardCharsets;
import java.util.Arrays;

/**
 * Splits a byte stream into lines at the byte level: {@code \n}, {@code \r\n} and a bare {@code \r} each end
 * a line. Keeps the unterminated tail across {@link #feed} calls, caps a line at {@code maxLineBytes} (the
 * rest is dropped and counted), skips lines holding binary control bytes, and decodes UTF-8 only for lines
 * that hold non-ASCII bytes. Because a line is assembled as bytes before it is decoded, a multi-byte
 * character split across two reads decodes whole. Tracks the byte offset just after the last complete line.
 *
 * <p>Not thread-safe; one per file being read.
 */
final class LineSplitter {

    private static final VarHandle WORD = MethodHandles.byteArrayViewVarHandle(long[].class, ByteOrder.LITTLE_ENDIAN);

    private final int max;
    private final String name;
    private final ByteLine view = new ByteLine();
    private final CharsetDecoder decoder = StandardCharsets.UTF_8.newDecoder()
            .onMalformedInput(CodingErrorAction.REPORT)
            .onUnmappableCharacter(CodingErrorAction.REPORT);
    private CharBuffer chars = CharBuffer.allocate(256);

    /** Bytes of a line that started in an earlier feed and is not complete yet. */
    private byte[] carry = new byte[256];
    private int carryLen;
    private boolean carrying;
    private boolean lineNonAscii;
    private boolean lineBinary;
    private boolean cut;
    private boolean pendingCr;

    private long next;
    private long committed;
    private long lineNo;

    LineSplitter(int maxLineBytes, String name) {
        this.max = maxLineBytes;
        this.name = name;
    }

    /**
     * Starts over at {@code offset} (the byte after a complete line) with {@code lineNo} lines behind it,
     * dropping any held fragment. {@code afterCr}: the byte before the offset was a carriage return, so a
     * line feed at the offset belongs to it.
     */
    void reset(long offset, long lines, boolean afterCr) {
        next = offset;
        committed = offset;
        lineNo = lines;
        pendingCr = afterCr;
        dropFragment();
    }

    /** Offset of the next byte to feed. */
    long next() {
        return next;
    }

    /** Offset just after the last complete line (its terminator included). */
    long committed() {
        return committed;
    }

    /** Lines ended so far (delivered or skipped). */
    long lineNo() {
        return lineNo;
    }

    /** True while an unterminated fragment is held. */
    boolean holdsFragment() {
        return carrying;
    }

    /**
     * Feeds the next bytes of the stream and delivers every line they complete.
     *
     * @return the number of lines delivered to {@code h}
     */
    int feed(byte[] buf, int from, int to, LineHandler h) {
        int delivered = 0;
        int i = from;
        if (pendingCr && i < to) {
            pendingCr = false;
            if (buf[i] == '\n') {
                i++;
                committed = next + (i - from);
            }
        }
        int start = i;
        boolean nonAscii = false;
        boolean binary = false;
        while (i < to) {
            // printable ASCII, eight bytes at a time: every byte of the word in 0x20..0x7f exactly when
            // neither the word nor the word less 0x20 in every byte has a top bit set (a byte below 0x20 is
            // the first to borrow, so the test cannot pass over one)
            while (i + 8 <= to) {
                long w = (long) WORD.get(buf, i);
                if (((w | (w - 0x2020202020202020L)) & 0x8080808080808080L) != 0) {
                    break;
                }
                i += 8;
            }
            if (i >= to) {
                break;
            }
            byte b = buf[i];
            if (b >= 0x20) {
                // printable ASCII: the hot path
                i++;
                continue;
            }
            if (b == '\n' || b == '\r') {
                lineNo++;
                int end = i;
                i++;
                if (b == '\r') {
                    if (i < to) {
                        if (buf[i] == '\n') {
                            i++;
                        }
                    } else {
                        pendingCr = true;
                    }
                }
                committed = next + (i - from);
                delivered += endLine(buf, start, end, nonAscii, binary, h);
                nonAscii = false;
                binary = false;
                start = i;
                continue;
            }
            if (b < 0) {
                nonAscii = true;
            } else if (isBinaryControl(b)) {
                binary = true;
            }
            i++;
        }
        if (start < to) {
            append(buf, start, to, nonAscii, binary, lineNo + 1, h);
        }
        next += to - from;
        return delivered;
    }

    /**
     * The input ended for good (end of a finished file, or a file replaced or gone): delivers a held
     * unterminated fragment as the last line.
     *
     * @return 1 if a line was delivered, else 0
     */
    int finish(LineHandler h) {
        pendingCr = false;
        if (!carrying) {
            return 0;
        }
        lineNo++;
        committed = next;
        return endLine(null, 0, 0, false, false, h);
    }

    /** Forgets a held fragment without delivering it (the file was truncated under it). */
    void dropFragment() {
        carryLen = 0;
        carrying = false;
        lineNonAscii = false;
        lineBinary = false;
        cut = false;
        if (carry.length > 64 * 1024) {
            carry = new byte[256];
        }
    }

    private static boolean isBinaryControl(byte b) {
        // tab, vertical tab, form feed, backspace and escape (terminal colours) occur in text logs
        return b != '\t' && b != 0x0b && b != '\f' && b != 0x08 && b != 0x1b;
    }

    private int endLine(byte[] buf, int start, int end, boolean nonAscii, boolean binary, LineHandler h) {
        if (carrying) {
            if (end > start) {
                append(buf, start, end, nonAscii, binary, lineNo, h);
            }
            int r = deliver(carry, 0, carryLen, lineNonAscii, lineBinary, cut, h);
            dropFragment();
            return r;
        }
        int len = end - start;
        boolean wasCut = false;
        if (len > max) {
            h.notice(cutNotice(lineNo));
            len = max;
            wasCut = true;
        }
        return deliver(buf, start, len, nonAscii, binary, wasCut, h);
    }

    private void append(byte[] buf, int start, int end, boolean nonAscii, boolean binary, long no, LineHandler h) {
        carrying = true;
        lineNonAscii |= nonAscii;
        lineBinary |= binary;
        int n = end - start;
        int room = max - carryLen;
        if (n > room) {
            if (!cut) {
                cut = true;
                h.notice(cutNotice(no));
            }
            n = room;
        }
        if (n <= 0) {
            return;
        }
        if (carryLen + n > carry.length) {
            carry = Arrays.copyOf(carry, Math.min(max, Math.max(carryLen + n, carry.length * 2)));
        }
        System.arraycopy(buf, start, carry, carryLen, n);
        carryLen += n;
    }

    private TailNotice cutNotice(long no) {
        return new TailNotice(TailNotice.Kind.LINE_CUT, no,
                name + ": line " + no + " is longer than " + max + " bytes; kept the first " + max);
    }

    private int deliver(byte[] b, int off, int len, boolean nonAscii, boolean binary, boolean wasCut,
            LineHandler h) {
        if (binary) {
            h.notice(new TailNotice(TailNotice.Kind.BINARY, lineNo,
                    name + ": line " + lineNo + " holds binary bytes; skipped"));
            return 0;
        }
        if (!nonAscii) {
            h.line(view.set(b, off, len), lineNo);
            return 1;
        }
        if (wasCut) {
            len = trimSplitCharacter(b, off, len);
        }
        h.line(decode(b, off, len, h), lineNo);
        return 1;
    }

    /** A cut may fall inside a multi-byte character: drop its leading bytes rather than count bad UTF-8. */
    private static int trimSplitCharacter(byte[] b, int off, int len) {
        for (int k = 1; k <= 3 && k <= len; k++) {
            int lead = b[off + len - k] & 0xff;
            if ((lead & 0xc0) == 0x80) {
                continue;
            }
            int need = lead >= 0xf0 ? 4 : lead >= 0xe0 ? 3 : lead >= 0xc0 ? 2 : 1;
            return need > k ? len - k : len;
        }
        return len;
    }

    private String decode(byte[] b, int off, int len, LineHandler h) {
        if (chars.capacity() < len) {
            chars = CharBuffer.allocate(Math.max(len, chars.capacity() * 2));
        }
        CharBuffer out = chars;
        out.clear();
        ByteBuffer in = ByteBuffer.wrap(b, off, len);
        decoder.reset();
        boolean bad = false;
        while (true) {
            CoderResult r = decoder.decode(in, out, true);
            if (r.isError()) {
                bad = true;
                out.put('\uFFFD');
                in.position(in.position() + r.length());
                continue;
            }
            // underflow: UTF-8 never yields more chars than bytes (a bad sequence becomes one char), so no overflow
            decoder.flush(out);
            break;
        }
        out.flip();
        if (bad) {
            h.notice(new TailNotice(TailNotice.Kind.BAD_UTF8, lineNo,
                    name + ": line " + lineNo + " holds invalid UTF-8; replaced by U+FFFD"));
        }
        return out.toString();
    }
}
