package org.forkscape.web.system;

import org.apache.catalina.core.StandardHost;
import org.forkscape.data.CsvLimits;
import org.forkscape.run.FreeSpace;
import org.forkscape.run.Workspace;
import org.forkscape.web.explore.InfluenceAnalysis;
import org.forkscape.web.explore.DecisionInfluence;
import jakarta.servlet.MultipartConfigElement;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.springframework.beans.factory.ObjectProvider;
import org.springframework.beans.factory.annotation.Value;
import org.springframework.boot.context.properties.EnableConfigurationProperties;
import org.springframework.boot.tomcat.servlet.TomcatServletWebServerFactory;
import org.springframework.boot.web.server.WebServerFactoryCustomizer;
import org.springframework.context.annotation.Bean;
import org.springframework.context.annotation.Configuration;
import org.springframework.util.unit.DataSize;

/** The services the pages share, built from the settings. */
@Configuration(proxyBeanMethods = false)
@EnableConfigurationProperties(ForkscapeSettings.class)
class WebConfiguration {
    private static final Logger LOG = LoggerFactory.getLogger(WebConfiguration.class);

    /** The workspace, its free space measured on its file store unless a test gives a {@link FreeSpace} of its own. */
    @Bean
    Workspace workspace(ForkscapeSettings settings, ObjectProvider<FreeSpace> freeSpace) {
        Workspace workspace = new Workspace(settings.workspace(), freeSpace.getIfAvailable(() -> FreeSpace.OF_FILE_STORE));
        LOG.info("analyses and runs are kept in {}", workspace.root());
        return workspace;
    }

    /**
     * Upload parts larger than the threshold go to a folder of the workspace that every start clears
     * ({@link Workspace#uploadParts()}), not to the system's temporary folder, where a killed upload
     * would stay forever. The limits are the multipart properties' own.
     */
    @Bean
    MultipartConfigElement multipartConfig(Workspace workspace,
            @Value("${spring.servlet.multipart.max-file-size}") DataSize maxFile,
            @Value("${spring.servlet.multipart.max-request-size}") DataSize maxRequest,
            @Value("${spring.servlet.multipart.file-size-threshold}") DataSize threshold) {
        return new MultipartConfigElement(workspace.uploadParts().toString(), maxFile.toBytes(), maxRequest.toBytes(),
                (int) threshold.toBytes());
    }

    /**
     * The embedded server keeps its working files in the workspace, one folder reused at every start, and
     * answers what it refuses itself in plain words ({@link PlainErrorReport}).
     */
    @Bean
    WebServerFactoryCustomizer<TomcatServletWebServerFactory> serverFilesInWorkspace(ForkscapeSettings settings) {
        Path folder = settings.workspace().toAbsolutePath().normalize().resolve(Workspace.SERVER_FILES);
        return factory -> {
            // an empty document root of our own: pages and files are served from the jar, not from a folder
            Path documents = folder.resolve("documents");
            try {
                Files.createDirectories(documents);
            } catch (IOException e) {
                throw new UncheckedIOException("cannot create " + documents + ": " + e.getMessage(), e);
            }
            factory.setBaseDirectory(folder.toFile());
            factory.setDocumentRoot(documents.toFile());
            factory.addContextCustomizers(context -> ((StandardHost) context.getParent())
                    .setErrorReportValveClass(PlainErrorReport.class.getName()));
        };
    }

    @Bean
    CsvLimits csvLimits(ForkscapeSettings settings) {
        return new CsvLimits(settings.data().maxColumns(), settings.data().maxCells());
    }

    @Bean
    ServerLimits serverLimits(ForkscapeSettings settings) {
        return ServerLimits.of(settings.runs());
    }

    /** The memory runs computing and tables being read share: one run's limit for each of the concurrent runs. */
    @Bean
    MemoryBudget memoryBudget(ServerLimits limits, ForkscapeSettings settings) {
        return new MemoryBudget(limits.maxMemory(), settings.runs().concurrent());
    }

    /** The influence panel's computation: the inference package's, over the filtered set. */
    @Bean
    InfluenceAnalysis influenceAnalysis() {
        return new DecisionInfluence();
    }

}
