/** Peak resident memory of this process, KiB (see peak-rss.cjs). */
export declare function peakRssKiB(): number;
