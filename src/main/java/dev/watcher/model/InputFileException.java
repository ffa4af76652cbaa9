package dev.watcher.model;

/**
 * A user's file (format, rules) is invalid. The message names the file, line, column and what was
 * expected, so it can be shown as it is. Thrown at start-up and by {@code check}, never on the hot path.
 */
public final class InputFileException extends Exception {
    private static final long serialVersionUID = 1L;

    private final String file;
    private final int line;
    private final int column;
    private final String expected;

    public InputFileException(String file, int line, int column, String expected) {
        super(file + ":" + line + ":" + column + ": " + expected);
        this.file = file;
        this.line = line;
        this.column = column;
        this.expected = expected;
    }

    public String file() {
        return file;
    }

    public int line() {
        return line;
    }

    public int column() {
        return column;
    }

    public String expected() {
        return expected;
    }
}
