package org.forkscape.web.system;

import org.forkscape.data.CsvLimits;
import org.forkscape.run.Workspace;
import org.forkscape.web.explore.InfluenceAnalysis;
import org.forkscape.web.explore.LevelInfluence;
import org.forkscape.web.run.SummarySections;
import org.springframework.boot.context.properties.EnableConfigurationProperties;
import org.springframework.context.annotation.Bean;
import org.springframework.context.annotation.Configuration;

/** The services the pages share, built from the settings. */
@Configuration(proxyBeanMethods = false)
@EnableConfigurationProperties(ForkscapeSettings.class)
class WebConfiguration {

    @Bean
    Workspace workspace(ForkscapeSettings settings) {
        return new Workspace(settings.workspace());
    }

    @Bean
    CsvLimits csvLimits(ForkscapeSettings settings) {
        return new CsvLimits(settings.data().maxColumns(), settings.data().maxCells());
    }

    /** The influence panel's computation; an inference-backed bean of this type replaces it. */
    @Bean
    InfluenceAnalysis influenceAnalysis() {
        return new LevelInfluence();
    }

    /**
     * The summary.json sections a run adds after its headline numbers. Without the inference stage wired in
     * there are none, exactly as the batch command writes them.
     */
    @Bean
    SummarySections summarySections() {
        return SummarySections.NONE;
    }
}
