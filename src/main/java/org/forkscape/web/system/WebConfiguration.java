package org.forkscape.web.system;

import org.forkscape.data.CsvLimits;
import org.forkscape.run.Workspace;
import org.forkscape.web.explore.InfluenceAnalysis;
import org.forkscape.web.explore.DecisionInfluence;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;
import org.springframework.boot.context.properties.EnableConfigurationProperties;
import org.springframework.context.annotation.Bean;
import org.springframework.context.annotation.Configuration;

/** The services the pages share, built from the settings. */
@Configuration(proxyBeanMethods = false)
@EnableConfigurationProperties(ForkscapeSettings.class)
class WebConfiguration {
    private static final Logger LOG = LoggerFactory.getLogger(WebConfiguration.class);

    @Bean
    Workspace workspace(ForkscapeSettings settings) {
        Workspace workspace = new Workspace(settings.workspace());
        LOG.info("analyses and runs are kept in {}", workspace.root());
        return workspace;
    }

    @Bean
    CsvLimits csvLimits(ForkscapeSettings settings) {
        return new CsvLimits(settings.data().maxColumns(), settings.data().maxCells());
    }

    @Bean
    ServerLimits serverLimits(ForkscapeSettings settings) {
        return ServerLimits.of(settings.runs());
    }

    /** The influence panel's computation: the inference package's, over the filtered set. */
    @Bean
    InfluenceAnalysis influenceAnalysis() {
        return new DecisionInfluence();
    }

}
