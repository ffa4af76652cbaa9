package dev.watcher.model;

/**
 * Text whose every character is one ASCII byte of a backing array: {@code charAt(i) == (char) array()[offset() + i]}
 * for {@code i < length()}. The tail stage hands ASCII lines over in this form so a parser may scan and parse
 * numbers straight from the bytes. Like any line the tail stage delivers, it is valid only during the call
 * that receives it; the array must not be written to or kept.
 */
public interface AsciiText extends CharSequence {

    /** The backing bytes (shared, not a copy). */
    byte[] array();

    /** Index in {@link #array()} of the first character. */
    int offset();
}
