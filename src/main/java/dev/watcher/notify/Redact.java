package dev.watcher.notify;

import java.net.URI;
import java.net.URISyntaxException;

/**
 * Makes URLs safe for logs and the timeline. Webhook URLs often carry their credential in the user info,
 * the query string or a path segment; this keeps what helps a person recognise the endpoint (scheme, host,
 * port, plain path words) and hides the rest with {@code ***}.
 *
 * <p>Stateless and thread-safe.
 */
public final class Redact {

    static final String MASK = "***";

    private Redact() {
    }

    /**
     * The URL with user info, query string and token-like path segments replaced by {@code ***}, and any
     * fragment dropped. A segment counts as a token when it holds a digit and is longer than four characters,
     * or is longer than twenty characters, or mixes upper and lower case beyond ten characters (version
     * words such as {@code v2} and plain words such as {@code hooks} stay). Text that is not an absolute URL
     * gives {@code ***}; null gives null.
     */
    public static String url(String url) {
        if (url == null) {
            return null;
        }
        URI u;
        try {
            u = new URI(url.strip());
        } catch (URISyntaxException e) {
            return MASK;
        }
        if (u.getScheme() == null || u.getRawAuthority() == null) {
            return MASK;
        }
        StringBuilder b = new StringBuilder(u.getScheme()).append("://");
        if (u.getRawUserInfo() != null) {
            b.append(MASK).append('@');
        }
        String host = u.getHost();
        if (host == null) {
            // an authority Java could not split into host and port: show nothing of it
            b.append(MASK);
        } else {
            b.append(host);
            if (u.getPort() >= 0) {
                b.append(':').append(u.getPort());
            }
        }
        String path = u.getRawPath();
        if (path != null && !path.isEmpty()) {
            String[] segments = path.split("/", -1);
            for (int i = 1; i < segments.length; i++) {
                b.append('/').append(tokenLike(segments[i]) ? MASK : segments[i]);
            }
        }
        if (u.getRawQuery() != null) {
            b.append('?').append(MASK);
        }
        return b.toString();
    }

    /**
     * Replaces every occurrence of {@code url} in {@code text} (an error message, say) by its redacted form.
     */
    static String scrub(String text, String url) {
        if (text == null || url == null || url.isEmpty()) {
            return text;
        }
        return text.replace(url, url(url));
    }

    private static boolean tokenLike(String s) {
        boolean digit = false;
        boolean upper = false;
        boolean lower = false;
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            digit |= Character.isDigit(c);
            upper |= Character.isUpperCase(c);
            lower |= Character.isLowerCase(c);
        }
        return (digit && s.length() > 4) || s.length() > 20 || (upper && lower && s.length() > 10);
    }
}
