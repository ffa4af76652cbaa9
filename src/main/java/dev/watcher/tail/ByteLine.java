package dev.watcher.tail;

import dev.watcher.model.AsciiText;
import java.nio.charset.StandardCharsets;

/**
 * A reusable CharSequence over ASCII bytes of a buffer: no String is built unless a receiver asks for one.
 * Valid only until the reader moves on.
 */
final class ByteLine implements AsciiText {

    private byte[] bytes;
    private int off;
    private int len;

    ByteLine set(byte[] b, int offset, int length) {
        this.bytes = b;
        this.off = offset;
        this.len = length;
        return this;
    }

    @Override
    public byte[] array() {
        return bytes;
    }

    @Override
    public int offset() {
        return off;
    }

    @Override
    public int length() {
        return len;
    }

    @Override
    public char charAt(int index) {
        if (index < 0 || index >= len) {
            throw new IndexOutOfBoundsException("index " + index + " of length " + len);
        }
        return (char) (bytes[off + index] & 0x7f);
    }

    @Override
    public CharSequence subSequence(int start, int end) {
        if (start < 0 || end > len || start > end) {
            throw new IndexOutOfBoundsException("range " + start + ".." + end + " of length " + len);
        }
        return new String(bytes, off + start, end - start, StandardCharsets.ISO_8859_1);
    }

    @Override
    public boolean isEmpty() {
        return len == 0;
    }

    @Override
    public String toString() {
        return new String(bytes, off, len, StandardCharsets.ISO_8859_1);
    }
}
