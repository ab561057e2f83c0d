// The preview of a CSV file's first rows shown beside the channel chooser
// (lib/data/drive-log-preview.server.ts).

export interface Preview {
  header: string[];
  rows: string[][];
}
