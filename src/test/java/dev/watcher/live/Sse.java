package dev.watcher.live;

import java.util.ArrayList;
import java.util.List;

/**
 * Reads a text/event-stream as the HTML Living Standard's "Server-sent events" section defines it (the
 * interpretation of the event stream): lines end with LF, CRLF or CR; a blank line dispatches the message;
 * {@code event} names it, {@code data} lines are joined by LF; lines starting with a colon are comments;
 * {@code id} sets the last event ID, which stays for the messages after it until another {@code id} changes it
 * (an id containing NULL is ignored).
 */
final class Sse {

    /** One dispatched message with the last event ID at its dispatch ("" when none was set yet). */
    record Message(String event, String data, String lastEventId) {
    }

    private final StringBuilder pending = new StringBuilder();
    private final List<Message> messages = new ArrayList<>();
    private String event = "message";
    private StringBuilder data;
    private String lastEventId = "";

    synchronized void feed(String chunk) {
        pending.append(chunk);
        int nl;
        while ((nl = lineEnd()) >= 0) {
            String line = pending.substring(0, nl);
            int skip = pending.charAt(nl) == '\r' && nl + 1 < pending.length() && pending.charAt(nl + 1) == '\n' ? 2 : 1;
            pending.delete(0, nl + skip);
            line(line);
        }
    }

    private int lineEnd() {
        for (int i = 0; i < pending.length(); i++) {
            char c = pending.charAt(i);
            if (c == '\n' || c == '\r') {
                return i;
            }
        }
        return -1;
    }

    private void line(String line) {
        if (line.isEmpty()) {
            if (data != null) {
                messages.add(new Message(event, data.toString(), lastEventId));
            }
            event = "message";
            data = null;
            return;
        }
        if (line.startsWith(":")) {
            return;
        }
        int colon = line.indexOf(':');
        String field = colon < 0 ? line : line.substring(0, colon);
        String value = colon < 0 ? "" : line.substring(colon + 1);
        if (value.startsWith(" ")) {
            value = value.substring(1);
        }
        if (field.equals("event")) {
            event = value;
        } else if (field.equals("id")) {
            if (value.indexOf('\0') < 0) {
                lastEventId = value;
            }
        } else if (field.equals("data")) {
            data = data == null ? new StringBuilder(value) : data.append('\n').append(value);
        }
    }

    synchronized List<Message> messages() {
        return List.copyOf(messages);
    }
}
