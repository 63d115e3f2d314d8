package org.forkscape.bench;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import org.apache.parquet.conf.PlainParquetConfiguration;
import org.apache.parquet.example.data.Group;
import org.apache.parquet.example.data.simple.SimpleGroupFactory;
import org.apache.parquet.hadoop.ParquetWriter;
import org.apache.parquet.hadoop.example.ExampleParquetWriter;
import org.apache.parquet.hadoop.metadata.CompressionCodecName;
import org.apache.parquet.io.LocalOutputFile;
import org.apache.parquet.schema.MessageType;
import org.apache.parquet.schema.MessageTypeParser;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * A Parquet copy of a table, written by Apache Parquet's own writer (parquet-hadoop's example writer,
 * SNAPPY, dictionary encoding on, the writer's default row groups): numeric columns as optional DOUBLE,
 * categorical ones as optional STRING, missing cells as nulls. It holds the same cells, so reading it gives
 * the table back; the benchmark times that reading, and the tests run plans on such copies.
 */
public final class ParquetCopy {
    private ParquetCopy() {
    }

    public static Path write(Table table, Path file) {
        StringBuilder schema = new StringBuilder("message copy {");
        for (Column c : table.columns()) {
            schema.append(c instanceof NumericColumn ? " optional double " : " optional binary ").append(c.name())
                    .append(c instanceof NumericColumn ? ";" : " (STRING);");
        }
        MessageType type = MessageTypeParser.parseMessageType(schema.append(" }").toString());
        SimpleGroupFactory groups = new SimpleGroupFactory(type);
        try {
            Files.deleteIfExists(file);
            try (ParquetWriter<Group> writer = ExampleParquetWriter.builder(new LocalOutputFile(file)).withType(type)
                    .withConf(new PlainParquetConfiguration()).withCompressionCodec(CompressionCodecName.SNAPPY)
                    .build()) {
                for (int i = 0; i < table.rowCount(); i++) {
                    Group g = groups.newGroup();
                    for (Column c : table.columns()) {
                        if (c.isMissing(i)) {
                            continue;
                        }
                        if (c instanceof NumericColumn n) {
                            g.append(c.name(), n.values()[i]);
                        } else {
                            CategoricalColumn cat = (CategoricalColumn) c;
                            g.append(c.name(), cat.levels().get(cat.codes()[i]));
                        }
                    }
                    writer.write(g);
                }
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return file;
    }
}
