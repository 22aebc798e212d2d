// Types of parse-prometheus-text-format (the package ships none): prom2json-shaped families.
declare module 'parse-prometheus-text-format' {
  interface PrometheusSample {
    readonly value?: string;
    readonly labels?: Readonly<Record<string, string>>;
    readonly buckets?: Readonly<Record<string, string>>;
    readonly count?: string;
    readonly sum?: string;
  }
  interface PrometheusFamily {
    readonly name: string;
    readonly help: string;
    readonly type: 'COUNTER' | 'GAUGE' | 'HISTOGRAM' | 'SUMMARY' | 'UNTYPED';
    readonly metrics: readonly PrometheusSample[];
  }
  export default function parsePrometheusTextFormat(text: string): PrometheusFamily[];
}
