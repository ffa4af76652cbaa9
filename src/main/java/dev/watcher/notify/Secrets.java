package dev.watcher.notify;

import dev.watcher.model.SecretRef;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;
import java.util.function.Function;

/**
 * Resolves a {@link SecretRef} to its value: the literal, the content of a file (surrounding white space and
 * the trailing newline removed), or an environment variable. Values are never logged; errors name only
 * where the value was expected ({@link SecretRef#describe()}).
 *
 * <p>Stateless and thread-safe. Reads a file: call it at start-up, not on an event loop.
 */
public final class Secrets {

    private Secrets() {
    }

    /**
     * The secret's value.
     *
     * @param ref where the value comes from; null gives null
     * @return the value, never empty; null only when {@code ref} is null
     * @throws IllegalArgumentException when the file is missing or unreadable, the variable unset, or the
     *                                  value empty; the message says where, never what
     */
    public static String resolve(SecretRef ref) {
        return resolve(ref, System.getenv()::get);
    }

    /** As {@link #resolve(SecretRef)} with a given environment (tests). */
    static String resolve(SecretRef ref, Function<String, String> env) {
        if (ref == null) {
            return null;
        }
        String value;
        if (ref.file() != null) {
            try {
                value = Files.readString(Path.of(ref.file()), StandardCharsets.UTF_8);
            } catch (IOException | RuntimeException e) {
                throw new IllegalArgumentException("cannot read secret from " + ref.describe() + ": "
                        + e.getClass().getSimpleName(), e);
            }
        } else if (ref.env() != null) {
            value = env.apply(ref.env());
            if (value == null) {
                throw new IllegalArgumentException("secret expected in " + ref.describe() + ", which is not set");
            }
        } else {
            value = ref.literal();
        }
        value = value == null ? "" : value.strip();
        if (value.isEmpty()) {
            throw new IllegalArgumentException("secret from " + ref.describe() + " is empty");
        }
        return value;
    }

    /** For tests that pass a fixed environment. */
    static Function<String, String> env(Map<String, String> vars) {
        return vars::get;
    }
}
