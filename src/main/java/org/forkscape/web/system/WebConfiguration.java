package org.forkscape.web.system;

import org.forkscape.data.CsvLimits;
import org.forkscape.run.Workspace;
import org.forkscape.web.explore.InfluenceAnalysis;
import org.forkscape.web.explore.DecisionInfluence;
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

    /** The influence panel's computation: the inference package's, over the filtered set. */
    @Bean
    InfluenceAnalysis influenceAnalysis() {
        return new DecisionInfluence();
    }

}
