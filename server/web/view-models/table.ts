/**
 * The table shape every view-model hands to the `table` partial (and the CSV exports). Kept in its own file
 * so the result and uncertainty view-models share it without importing each other.
 */
export interface TableView {
  head: string[];
  rows: { label: string; cells: string[] }[];
  /** Stable name of the table: its CSV download is `tables/<name>.csv` beside the result. */
  name?: string;
  /** Caption shown above the table and used as the CSV file's first line. */
  caption?: string;
}
