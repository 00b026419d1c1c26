package org.starderive.physics;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStream;
import java.io.InputStreamReader;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;

/** Reads a CSV reference table from test resources; lines starting with '#' are the header naming the source. */
final class ReferenceTable {
    private ReferenceTable() {}

    static List<String[]> read(String resource) throws IOException {
        InputStream s = ReferenceTable.class.getResourceAsStream(resource);
        if (s == null) {
            throw new IOException("Missing test resource " + resource);
        }
        List<String[]> rows = new ArrayList<>();
        try (BufferedReader r = new BufferedReader(new InputStreamReader(s, StandardCharsets.UTF_8))) {
            String line;
            while ((line = r.readLine()) != null) {
                if (line.isBlank() || line.startsWith("#")) {
                    continue;
                }
                rows.add(line.split(","));
            }
        }
        if (rows.isEmpty()) {
            throw new IOException("No rows in " + resource);
        }
        return rows;
    }
}
