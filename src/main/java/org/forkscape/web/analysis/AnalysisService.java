package org.forkscape.web.analysis;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.forkscape.data.CsvLimits;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.DataException;
import org.forkscape.data.Table;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.Workspace;
import org.springframework.stereotype.Service;
import org.springframework.web.multipart.MultipartFile;

/**
 * Creates analyses from uploaded CSV files and serves their data. An upload is copied to the workspace,
 * read in full, and becomes an analysis only when it reads without a problem; otherwise nothing is kept
 * and the problem, naming the uploaded file and line, goes back to the user. The uploaded file's name is
 * only ever shown, never used as a path.
 */
@Service
public class AnalysisService {
    private static final int CACHED_TABLES = 4;
    private static final int MAX_TITLE = 200;

    private final Workspace workspace;
    private final CsvLimits limits;
    private final Map<String, Table> tables = new LinkedHashMap<>(8, 0.75f, true) {
        @Override
        protected boolean removeEldestEntry(Map.Entry<String, Table> eldest) {
            return size() > CACHED_TABLES;
        }
    };

    public AnalysisService(Workspace workspace, CsvLimits limits) {
        this.workspace = workspace;
        this.limits = limits;
    }

    /**
     * Reads an upload and, when it is a usable table, keeps it as a new analysis.
     *
     * @throws DataException naming the file (as uploaded) and line when it cannot be used
     */
    public StoredAnalysis create(String title, String fileName, InputStream content, boolean demo) {
        String shown = displayName(fileName);
        Path incoming = workspace.newIncomingFile();
        try {
            Files.copy(content, incoming, StandardCopyOption.REPLACE_EXISTING);
            Table table;
            try (InputStream in = Files.newInputStream(incoming)) {
                table = new CsvTableReader(limits).read(in, shown);
            }
            StoredAnalysis a = workspace.createAnalysis(title(title, shown), shown, table.rowCount(),
                    table.columns().size(), incoming, demo);
            synchronized (tables) {
                tables.put(a.id(), table);
            }
            return a;
        } catch (IOException e) {
            throw workspace.writeFailure(e, "the upload was not kept");
        } finally {
            try {
                Files.deleteIfExists(incoming);
            } catch (IOException ignored) {
                // left in .incoming, which the next start clears
            }
        }
    }

    /**
     * Gives an analysis a new title (cleaned as an upload's is) and archive mark.
     *
     * @throws org.forkscape.InputException at {@code title} when nothing is left of the title
     */
    public StoredAnalysis relabel(StoredAnalysis analysis, String title, boolean archived) {
        return workspace.updateAnalysis(analysis.labelled(clean(title == null ? "" : title, MAX_TITLE), archived));
    }

    /**
     * Deletes an analysis with its runs ({@link Workspace#deleteAnalysis}) and forgets its table.
     *
     * @throws org.forkscape.InputException when one of its runs is queued or running
     */
    public void delete(StoredAnalysis analysis) {
        workspace.deleteAnalysis(analysis.id());
        synchronized (tables) {
            tables.remove(analysis.id());
        }
    }

    /** Cleans a run's name as a title is cleaned. */
    public static String runName(String name) {
        return clean(name == null ? "" : name, MAX_TITLE);
    }

    public List<StoredAnalysis> all() {
        return workspace.analyses();
    }

    public Optional<StoredAnalysis> find(String id) {
        return workspace.analysis(id);
    }

    /** The analysis's data, read once and kept while it is in use. */
    public Table table(StoredAnalysis analysis) {
        synchronized (tables) {
            Table t = tables.get(analysis.id());
            if (t != null) {
                return t;
            }
        }
        Table read;
        try (InputStream in = Files.newInputStream(workspace.dataFile(analysis.id()))) {
            read = new CsvTableReader(limits).read(in, analysis.dataName());
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read the data of analysis " + analysis.id() + ": " + e.getMessage(), e);
        }
        synchronized (tables) {
            tables.put(analysis.id(), read);
        }
        return read;
    }

    /**
     * Whether a form came without a file: no part, or a part with neither a name nor content (what a
     * browser sends when nothing was chosen). A chosen file that is empty is read, and refused as empty.
     */
    static boolean noFileChosen(MultipartFile file) {
        return file == null || file.isEmpty()
                && (file.getOriginalFilename() == null || file.getOriginalFilename().isBlank());
    }

    /** The last segment of an uploaded file's name, without control characters, for messages and lists. */
    static String displayName(String fileName) {
        String name = fileName == null ? "" : fileName;
        int cut = Math.max(name.lastIndexOf('/'), name.lastIndexOf('\\'));
        name = clean(name.substring(cut + 1), 120);
        return name.isEmpty() ? "upload.csv" : name;
    }

    private static String title(String title, String shown) {
        String t = clean(title == null ? "" : title, MAX_TITLE);
        if (!t.isEmpty()) {
            return t;
        }
        return shown.toLowerCase().endsWith(".csv") ? shown.substring(0, shown.length() - 4) : shown;
    }

    private static String clean(String text, int max) {
        StringBuilder b = new StringBuilder();
        text.codePoints().filter(c -> !Character.isISOControl(c)).forEach(b::appendCodePoint);
        String s = b.toString().strip();
        return s.length() > max ? s.substring(0, max) : s;
    }
}
