// Lines, shifts, processes and stations of the plant: the admin's side of PRODUCT.md §2.
// Every change is audited in the same transaction; nothing is deleted, only deactivated.
export {
	ConflictError,
	PlantRuleError,
	resolveSiteId,
	setPlantActive,
	type Deactivatable,
	type PlantKind
} from './common';
export { createLine, getLine, listLines, updateLine } from './lines';
export { createShift, getShift, listShifts, updateShift } from './shifts';
export { createProcess, getProcess, listProcesses, updateProcess } from './processes';
export {
	createStation,
	getStation,
	listStations,
	stationFormChoices,
	updateStation
} from './stations';
export { plantMap, type MapProcess } from './map';
