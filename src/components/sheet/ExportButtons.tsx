import { secondaryButton } from '../form-parts';
import { downloadText } from '../../lib/client/download';
import { exportCsv, exportFileName, exportJson, type ExportSource, type ExportTable } from '../../lib/sheet/run-export';

/** "Export CSV" and "Export JSON" for a finished run or sweep: the files are written here from the worker's table, no server round trip. */
export default function ExportButtons({ table, source }: { table: ExportTable; source: ExportSource }) {
  const fileName = (extension: 'csv' | 'json') => exportFileName(source.title, source.revision ?? 0, extension, table.kind);
  return (
    <div className="flex flex-wrap gap-2" data-testid={`${table.kind}-export`}>
      <button type="button" className={secondaryButton} onClick={() => downloadText(exportCsv(table, source), fileName('csv'), 'text/csv')}>
        Export CSV
      </button>
      <button type="button" className={secondaryButton} onClick={() => downloadText(exportJson(table, source), fileName('json'), 'application/json')}>
        Export JSON
      </button>
      <span className="self-center text-xs text-graphite">SI units, one row per {table.kind === 'run' ? 'time step' : 'swept value'}, with the safety caution.</span>
    </div>
  );
}
