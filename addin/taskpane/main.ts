/**
 * The Excel task pane: the shared sidebar with the Office adapter as its host. Runs in the shared
 * runtime, so the cell functions (functions.js) are registered from here too.
 */
import '../shared/sidebar.css';
import '../functions/register.js';
import { ExcelAdapter } from '../excel/adapter.js';
import type { OfficeExcelRun } from '../excel/api.js';
import { canDelayForCellEdit, excelRunner } from '../excel/run.js';
import { applyTheme, button, h } from '../shared/dom.js';
import type { SidebarHost } from '../shared/host.js';
import { drawReportPictures } from '../shared/png.js';
import { mountSidebar } from '../shared/sidebar.js';
import { tableAsCsv } from '../shared/table-profile.js';

// Excel holds our batches while the analyst types in a cell where it can (ExcelApi 1.11); see run.ts
const officeRun = ((...args: unknown[]) => (Excel.run as (...a: unknown[]) => Promise<unknown>)(...args)) as OfficeExcelRun;
// asked at each use: Office's requirement check is ready only after Office.onReady
const isSetSupported = (name: string, version: string) => Office.context?.requirements?.isSetSupported(name, version) === true;
const excel = new ExcelAdapter(excelRunner(officeRun, () => canDelayForCellEdit(isSetSupported)), { isSetSupported });

const host: SidebarHost = {
  kind: 'excel',
  dataSource(slot, provide, fail) {
    const read = () => excel.readActiveTable().then((table) => provide({ table, origin: 'sheet', file: tableAsCsv(table) }), fail);
    slot.append(
      h('p', { class: 'hint' }, 'Open the sheet with one row per area (column names in the first row), then read it.'),
      h('div', { class: 'buttons' }, button('Read the active sheet', () => void read(), { id: 'read-sheet', primary: true })),
    );
    void read();
  },
  loadSetup: () => excel.loadSetup(),
  saveSetup: (setup) => excel.saveSetup(setup),
  loadBoundary: () => excel.loadBoundary(),
  storeBoundary: (files) => excel.storeBoundary(files),
  async writeResults(output, _engine, stage) {
    stage('Drawing the maps');
    await drawReportPictures(output.report);
    stage('Writing the result sheets');
    const names = await excel.writeReport(output);
    // one name per report sheet, in order: the neighbour list's is found by the sheet's role, not its name
    const neighbours = names[output.report.sheets.findIndex((s) => s.role === 'neighbours')] ?? 'Neighbours';
    return { message: `The results are on ${names.length} new sheets, starting with "${names[0]}". The neighbour list is on "${neighbours}" for the SPILL cell functions.` };
  },
  showCell: (sheet, cell) => excel.showCell(sheet, cell),
};

Office.onReady(() => {
  applyTheme();
  mountSidebar(document.getElementById('sidebar')!, host);
});
