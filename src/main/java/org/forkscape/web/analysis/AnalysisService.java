package org.forkscape.web.analysis;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import com.github.benmanes.caffeine.cache.Cache;
import com.github.benmanes.caffeine.cache.Caffeine;
import org.forkscape.data.CsvLimits;
import org.forkscape.data.DataFiles;
import org.forkscape.data.DataException;
import org.forkscape.data.ParquetParts;
import org.forkscape.data.Table;
import org.forkscape.data.TableFootprint;
import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.Workspace;
import org.forkscape.web.system.MemoryBudget;
import org.forkscape.web.system.MemoryBudgetException;
import org.springframework.beans.factory.annotation.Autowired;
import org.springframework.stereotype.Service;
import org.springframework.web.multipart.MultipartFile;

/**
 * Creates analyses from uploaded CSV or Parquet files (a name ending in {@code .parquet} is read as Parquet,
 * any other as CSV, by {@link DataFiles}) and serves their data. An upload is copied to the workspace,
 * priced before it is parsed ({@link TableFootprint}) against the {@link MemoryBudget}, read in full
 * within its reservation, and becomes an analysis only when it reads without a problem; otherwise nothing
 * is kept and the problem, naming the uploaded file and line, goes back to the user. The uploaded file's
 * name is only ever shown, never used as a path. Tables read are kept in memory, weighed by what they hold,
 * up to the budget's limit for one run or upload; no lock is held while a file is read.
 */
@Service
public class AnalysisService {
    private static final int MAX_TITLE = 200;

    private final Workspace workspace;
    private final CsvLimits limits;
    private final MemoryBudget budget;
    private final Cache<String, Table> tables;

    /** A service without a memory limit, for tools and tests that build one by hand. */
    public AnalysisService(Workspace workspace, CsvLimits limits) {
        this(workspace, limits, MemoryBudget.unlimited());
    }

    @Autowired
    public AnalysisService(Workspace workspace, CsvLimits limits, MemoryBudget budget) {
        this.workspace = workspace;
        this.limits = limits;
        this.budget = budget;
        this.tables = Caffeine.newBuilder()
                .maximumWeight(Math.max(1, Math.min(budget.limit(), Long.MAX_VALUE / 2) >> 10))
                .weigher((String id, Table t) -> (int) Math.min(Integer.MAX_VALUE,
                        1 + (TableFootprint.heldBy(t) >> 10)))
                .build();
    }

    /**
     * Reads an upload and, when it is a usable table, keeps it as a new analysis.
     *
     * @throws DataException         naming the file (as uploaded) and line when it cannot be used
     * @throws MemoryBudgetException when reading it would hold more memory than the budget gives
     */
    public StoredAnalysis create(String title, String fileName, InputStream content, boolean demo) {
        String shown = displayName(fileName);
        String stored = ParquetParts.hasParquetName(shown) ? Workspace.DATA_PARQUET : Workspace.DATA;
        Path incoming = workspace.newIncomingFile(stored.substring(stored.lastIndexOf('.')));
        try {
            Files.copy(content, incoming, StandardCopyOption.REPLACE_EXISTING);
            Table table = read(incoming, shown, "the upload was not kept");
            StoredAnalysis a = workspace.createAnalysis(title(title, shown), shown, table.rowCount(),
                    table.columns().size(), incoming, stored, demo);
            tables.put(a.id(), table);
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

    /** The memory budget the tables being read share with the runs computing. */
    public MemoryBudget memoryBudget() {
        return budget;
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
        tables.invalidate(analysis.id());
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

    /**
     * The analysis's data, read once and kept while it is in use.
     *
     * @throws MemoryBudgetException when it is not kept and reading it again would hold more memory than the
     *                               budget gives now
     */
    public Table table(StoredAnalysis analysis) {
        Table kept = tables.getIfPresent(analysis.id());
        if (kept != null) {
            return kept;
        }
        Table read;
        try {
            read = read(workspace.dataFile(analysis.id()), analysis.dataName(),
                    "the analysis is kept, and its data is read again when asked for");
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read the data of analysis " + analysis.id() + ": " + e.getMessage(), e);
        }
        tables.put(analysis.id(), read);
        return read;
    }

    /** Prices the file before parsing it, then reads it within a reservation of the memory budget. */
    private Table read(Path file, String shown, String consequence) throws IOException {
        TableFootprint footprint = DataFiles.footprint(file, shown, limits);
        try (MemoryBudget.Reservation memory = budget.reserve(shown, footprint, consequence)) {
            return DataFiles.read(file, shown, limits, memory);
        }
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
        String lower = shown.toLowerCase(Locale.ROOT);
        for (String extension : List.of(".csv", ".parquet")) {
            if (lower.endsWith(extension) && lower.length() > extension.length()) {
                return shown.substring(0, shown.length() - extension.length());
            }
        }
        return shown;
    }

    private static String clean(String text, int max) {
        StringBuilder b = new StringBuilder();
        text.codePoints().filter(c -> !Character.isISOControl(c)).forEach(b::appendCodePoint);
        String s = b.toString().strip();
        return s.length() > max ? s.substring(0, max) : s;
    }
}
