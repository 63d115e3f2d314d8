package org.forkscape.cli;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;

/** Parses {@code --name value} options and positional arguments against a fixed set of option names. */
final class Arguments {
    private final List<String> positional = new ArrayList<>();
    private final Map<String, String> options = new HashMap<>();

    Arguments(String[] args, int from, Set<String> known) {
        for (int i = from; i < args.length; i++) {
            String a = args[i];
            if (a.startsWith("--")) {
                String name = a.substring(2);
                String value = null;
                int eq = name.indexOf('=');
                if (eq >= 0) {
                    value = name.substring(eq + 1);
                    name = name.substring(0, eq);
                }
                if (!known.contains(name)) {
                    throw new UsageException("unknown option --" + name + "; the options are --"
                            + String.join(", --", new java.util.TreeSet<>(known)));
                }
                if (value == null) {
                    if (i + 1 >= args.length) {
                        throw new UsageException("--" + name + " needs a value");
                    }
                    value = args[++i];
                }
                options.put(name, value);
            } else {
                positional.add(a);
            }
        }
    }

    List<String> positional() {
        return positional;
    }

    String text(String name) {
        return options.get(name);
    }

    boolean has(String name) {
        return options.containsKey(name);
    }

    long whole(String name, long fallback, long min, long max) {
        String v = options.get(name);
        if (v == null) {
            return fallback;
        }
        long value;
        try {
            value = Long.parseLong(v.trim());
        } catch (NumberFormatException e) {
            throw new UsageException("--" + name + " must be a whole number; found \"" + v + "\"");
        }
        if (value < min || value > max) {
            throw new UsageException("--" + name + " must be between " + min + " and " + max + "; found " + value);
        }
        return value;
    }
}
