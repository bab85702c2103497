/** The columns of a Thiele–Small CSV, apart from its parser, so the form that shows them need not load papaparse. */
export const TS_CSV_TEMPLATE = "serial,fs,qts,qes,qms,re,vas,sensitivity\n";
