// Demo work instructions of the invented plant KBO-2, written as its trainers would. Parameter
// values are illustrative; the plant's validated recipe governs at every station.

export interface DemoRevision {
	letter: string;
	/** 'superseded' and 'effective' are approved revisions; their effective instants order them. */
	kind: 'superseded' | 'effective' | 'scheduled' | 'in_review' | 'draft';
	daysAgo: number;
	summary: string;
	reason: string;
	classification: 'editorial' | 'acknowledge' | 'retraining';
	source: string;
}

export interface DemoInstruction {
	docNumber: string;
	title: string;
	process: string | null;
	stations: string[];
	reviewDueInDays: number;
	images: { name: string; svg: string }[];
	revisions: DemoRevision[];
}

const RECIPE_NOTE =
	':::note\nValues in this instruction are illustrative. The validated recipe loaded on the bonder governs; if they differ, stop and call the process engineer.\n:::';

const HOT_HEAD =
	':::caution Hot head\nThe bond head runs at 150–300 °C. Never touch the head, the heater block or the stage; use the tweezers and the heat-resistant glove from the station kit.\n:::';

const PINCH =
	':::warning Pinch point\nThe pneumatic head closes with up to several hundred newtons. Keep both hands outside the light curtain while the head moves; never reach under a raised head without the safety block in place.\n:::';

const IPA =
	':::caution IPA\nIsopropyl alcohol is flammable. Keep it in the labelled dispenser, away from the hot head; no more than the day amount at the station. Wear nitrile gloves; follow the plant safety data sheet and local regulations.\n:::';

const ESD =
	':::caution ESD\nDriver chips and FPCs are damaged by static discharge you cannot feel. Wrist strap on and tested, heel straps on, parts only on the grounded mat.\n:::';

const PTFE =
	':::caution PTFE fumes\nAn overheated PTFE buffer sheet gives off fumes that cause flu-like symptoms. Never run the head above the recipe temperature with a PTFE sheet, keep the extraction on, and report any burnt smell.\n:::';

function acfThaw(rev: 'A' | 'B'): string {
	const thaw = rev === 'A' ? '1 hour' : '2 hours';
	const floor = rev === 'A' ? '7 days' : '5 days';
	return `# Purpose

Make sure an ACF reel reaches room temperature before its bag is opened, and that no reel is
used past its floor life. Condensation on a cold reel and over-aged film both cause open and
high-resistance bonds that pass the visual check.

${ESD}

## Storage

| Condition | Limit |
|---|---|
| Freezer storage | \`−10 to 5 °C\`, sealed bag, up to the maker's expiry date |
| Thaw in sealed bag | at least \`${thaw}\` at room temperature |
| Floor life after opening | \`${floor}\` at \`23 ± 3 °C\`, \`≤ 60 % RH\` |

## Steps

1. Take the reel from the ACF freezer and check the label: type, lot, expiry date. Do not take a reel past its expiry date.
2. Write the time out of the freezer on the reel label and on the thaw log sheet.
3. Leave the reel **in its sealed bag** on the thaw rack for at least ${thaw}. Do not open the bag early, do not warm the reel with a heat gun or on the bonder.
4. After the thaw time, wipe the bag dry, open it, and write the opening date and time on the reel with the floor-life end date (${floor} later).
5. Load the reel on the laminator and scan the reel barcode so the bonder records the lot.
6. At the end of the floor life, remove the reel even if film is left, mark it *EXPIRED* and put it in the red bin.
${rev === 'B' ? '7. A reel that was put back in the freezer after opening is not used again; mark it *EXPIRED*.\n' : ''}
## Why this matters

Cold film pulls moisture from the air the moment the bag opens. Water in the adhesive makes
voids during the main bond, and the joint fails in the humidity test weeks later.
`;
}

function cogMainBond(rev: 'A' | 'B' | 'C'): string {
	const temp = rev === 'A' ? '180' : '186';
	const time = rev === 'C' ? '7' : '8';
	const pressure = rev === 'A' ? '70' : '80';
	return `# Purpose

Bond the driver chip to the 1.4" OLED glass on the COG bonders with the parameters of the
validated recipe, and check the first bond of every lot.

${RECIPE_NOTE}

${HOT_HEAD}

${PINCH}

## Parameters (illustrative)

| Step | Setting |
|---|---|
| Main bond head | \`${temp} °C · ${pressure} MPa on bump area · ${time} s\` |
| Stage | \`70 °C\` |
| Buffer sheet | silicone, 0.2 mm (see WI-GEN-005) |

Work out the head force for the chip's bump area before setting the regulator; the recipe
value must match within 5 %:

\`\`\`calc bond-force
basis: bump
bumpCount: 1200
bumpWidthUm: 18
bumpLengthUm: 100
pressureMPa: ${pressure}
\`\`\`

## Steps

1. Check the recipe name on the HMI matches the part number on the traveller. If not, stop and call the line lead.
2. Check the head temperature log of this shift (WI-CAL-006). No entry for this shift: do the check first.
3. Check the buffer sheet counter. At or over the limit: change the sheet (WI-GEN-005).
4. Place the glass with the laminated ACF on the stage, chip side up; the vacuum indicator must be green.
5. Pick the chip with the tweezers by its long edges only and place it in the pre-bond nest.
6. Start the cycle with both hands on the two-hand buttons and keep them there until the head lifts.
7. After the first bond of a lot, take the part to the indentation microscope (WI-INSP-007) before you run the rest of the lot.
${rev !== 'A' ? '8. Record the lot, the first-bond result and your badge on the traveller.\n' : ''}${rev === 'C' ? '9. If two first bonds in a row fail indentation, stop the lot and call the process engineer; do not adjust the force yourself.\n' : ''}
## If something goes wrong

- Head alarm *temperature deviation*: stop, do not bond, call maintenance.
- Chip misplaced in the nest: lift the head, remove the chip with the tweezers, start again with a new chip; the old chip goes to the scrap box.
`;
}

function fogPreBond(rev: 'A' | 'B'): string {
	return `# Purpose

Align and tack the FPC to the glass before the main bond, so the main bonder only has to
press a part that is already in place.

${HOT_HEAD}

${PINCH}

## Parameters (illustrative)

| Step | Setting |
|---|---|
| Pre-bond head | \`${rev === 'A' ? '80' : '90'} °C · 0.5 MPa · 1 s\` |
| Alignment tolerance | \`± ${rev === 'A' ? '15' : '10'} µm\` on both marks |

## Steps

1. Check that the ACF on the glass is laminated straight and covers the whole pad row; wrinkles or bubbles: reject the glass to the rework tray.
2. Peel the ACF cover film at a low angle, away from the pads. Never touch the film with a finger.
3. Place the FPC in the holder, contacts down.
4. Align both alignment marks on the monitor. ${rev === 'B' ? 'Wait until the offset read-out shows both marks within ± 10 µm and green.' : 'Align by eye on the monitor.'}
5. Start the tack cycle. The head lowers, tacks and lifts.
6. Check on the monitor that the FPC did not move during the tack. Moved: lift the FPC at once, before the main bond, and start again with fresh ACF.
7. Pass the part to the main bonder in the carrier, FPC side up.
`;
}

function fogMainBond(rev: 'A' | 'B' | 'C'): string {
	const force = rev === 'C' ? '3.5' : '3.0';
	return `# Purpose

Make the FOG main bond on the 7" LCD line: thermocompression of the pre-bonded FPC through the
buffer sheet at the recipe temperature, pressure and time.

${RECIPE_NOTE}

${HOT_HEAD}

${PINCH}

${PTFE}

## Parameters (illustrative)

| Step | Setting |
|---|---|
| Main bond head | \`190 °C · ${force} MPa on tool area · 10 s\` |
| Buffer sheet | PTFE, 0.05 mm |
| Backup stage | \`40 °C\` |

Check the regulator setting against the tool area with the calculator:

\`\`\`calc bond-force
basis: tool
widthMm: 1.5
lengthMm: 60
pressureMPa: ${force}
\`\`\`

## Steps

1. Check recipe, head temperature log and buffer sheet counter, as at every bonder.
2. Place the carrier on the stage and let the pins locate it; do not press it down.
3. Check on the monitor that the FPC is still aligned after transport.
4. Start the cycle with the two-hand buttons.
5. After the head lifts, wait until the stage light turns green before you take the part; the joint is still cooling.
6. Every 50 parts, and after each buffer-sheet change, send one part to the indentation microscope.
${rev === 'C' ? '7. Every 500 parts, send one part for a peel test (WI-INSP-008).\n' : ''}`;
}

function bufferSheet(rev: 'A' | 'B'): string {
	return `# Purpose

Change the buffer sheet between the bond head and the part before it is worn through. A worn
sheet gives uneven pressure along the bond line and weak indentation at the ends.

${HOT_HEAD}

${PTFE}

## When

- When the sheet counter on the HMI reaches the limit in the recipe (for example \`${rev === 'A' ? '500' : '400'} bonds\`).
- At the start of each shift if the sheet shows a dark line or a cut.
- After any head alarm.

## Steps

1. Put the bonder in *maintenance* mode; the head moves to the top position and the heater stays on.
2. Wear the heat-resistant glove. Cut the used sheet at the take-up side.
3. Pull fresh sheet from the supply reel under the head, along the path in the picture, and fix it on the take-up reel.

![Buffer sheet path: from the supply reel under the head to the take-up reel](asset:buffer-sheet-path.png "Buffer sheet path on the main bonders (schematic)")

4. Tension the sheet with the take-up knob until it lies flat under the head without ripples.
5. Reset the sheet counter on the HMI and enter your badge.
6. Make one bond on a dummy part and check it at the indentation microscope before production.
${rev === 'B' ? '7. Put the used sheet in the bin for PTFE waste, not in general waste.\n' : ''}`;
}

function headCalibration(rev: 'A' | 'B'): string {
	return `# Purpose

Check once per shift that the real temperature under the bond head matches the set point, with
the thermocouple sensor sheet, and log the result.

${HOT_HEAD}

## Limits (illustrative)

| Set point | Accepted reading |
|---|---|
| \`186 °C\` | \`${rev === 'A' ? '181–191' : '183–189'} °C\` |
| \`190 °C\` | \`${rev === 'A' ? '185–195' : '187–193'} °C\` |

## Steps

1. Put the bonder in *maintenance* mode at the recipe set point and wait until the HMI shows *stable* for 5 minutes.
2. Place the thermocouple sensor sheet on the stage under the centre of the head, with the buffer sheet in place.
3. Start the *measure* cycle. The head presses the sensor for the recipe time.
4. Read the peak temperature from the meter.
5. Enter the reading in the temperature log on the HMI.
6. Reading outside the limits: put the bonder on hold with the red tag and call maintenance. Do not change the set point yourself.
${rev === 'B' ? '7. Check that the meter calibration sticker is in date; out of date: use the spare meter and tell the line lead.\n' : ''}
A cure-degree estimate for the reading can be checked with the calculator (planning only):

\`\`\`calc cure-degree
startC: 25
endC: 186
durationS: 8
\`\`\`
`;
}

function indentation(rev: 'A' | 'B'): string {
	const min = rev === 'A' ? '3' : '5';
	return `# Purpose

Judge the main bond by the particle indentation marks on the bumps or leads, seen through the
glass under the DIC microscope.

## Acceptance (illustrative)

| Check | Accept |
|---|---|
| Indentation marks per bump | at least \`${min}\` clear marks |
| Spread of marks | even along the bump, not only at one end |
| Bridging | no particle chain between neighbouring bumps |

![Good and poor indentation patterns on a bump row](asset:indentation-good-poor.png "Left: good — many even marks on each bump. Right: poor — few marks, all at one end (low or uneven pressure).")

## Steps

1. Place the part glass side up under the microscope, DIC prism in.
2. Focus on the bump row. Start at the left end.
3. Count the marks on five bumps: both ends and the middle of the row.
4. Compare the pattern with the picture. Uneven marks at one end mean the buffer sheet or the head parallelism needs checking.
5. Record the counts on the HMI of the inspection station.
6. Below the limit, or marks only at one end: reject the part, put the bonder on hold with the yellow tag, and call the line lead.
${rev === 'B' ? '7. Any bridging is a reject, whatever the counts.\n' : ''}`;
}

function peelTest(rev: 'A' | 'B'): string {
	return `# Purpose

Measure the peel strength of an FPC bond as a destructive check of the bond process.

${HOT_HEAD}

## Acceptance (illustrative)

| Test | Accept |
|---|---|
| 90° peel, 50 mm/min | at least \`${rev === 'A' ? '6' : '7'} N/cm\` |
| Failure mode | cohesive in the ACF; no clean lift from the pads |

![90° peel test set-up: glass clamped flat, FPC pulled straight up](asset:peel-test-setup.png "90° peel set-up (schematic)")

## Steps

1. Let the bonded part cool for at least 30 minutes.
2. Cut the FPC to 10 mm width with the cutting jig.
3. Clamp the glass flat on the sliding table; fix the FPC end in the grip.
4. Run the 90° peel program.
5. Record the average force over the middle 80 % of the peel length.
6. Look at the pads under the microscope: adhesive left on both sides is good; clean pads mean the adhesive did not bond.
7. Below the limit or clean pads: tell the line lead at once; the lot is held.
`;
}

function esdBasics(rev: 'A' | 'B'): string {
	return `# Purpose

Everyone who handles chips, FPCs or panels keeps them safe from electrostatic discharge.

${ESD}

## Steps

1. At the ESD tester at the line entrance, test wrist strap and heel straps. Green on both: go in. Red: change the strap and test again.
2. At the station, connect the wrist strap to the mat socket before you touch any part.
3. Keep plastic bags, paper and phones off the mat; they charge and discharge.
4. Move parts only in the conductive trays.
${rev === 'B' ? '5. The ionizer over the bonder must be on; its light green. Off or red: tell the line lead.\n6. Log a failed strap test in the ESD log.\n' : '5. Log a failed strap test in the ESD log.\n'}`;
}

function ipaCleaning(rev: 'A' | 'B'): string {
	return `# Purpose

Clean the glass pads before ACF lamination, so that no film of grease or dust stays between
pad and ACF.

${IPA}

${ESD}

## Steps

1. Wet a lint-free wipe with IPA from the dispenser. Never dip the wipe into the bottle.
2. Wipe the pad row once, in one direction, from the panel centre outwards.
3. ${rev === 'A' ? 'Turn the wipe and wipe again.' : 'Take a new wipe for the second pass; never use the same wipe twice.'}
4. Let the IPA flash off for at least \`${rev === 'A' ? '10' : '30'} s\` before lamination.
5. Check the pads under the lamp: no streaks, fibres or spots.
6. Put used wipes in the closed metal bin.
`;
}

const SVG_HEAD = `<svg xmlns="http://www.w3.org/2000/svg" width="960" height="420" viewBox="0 0 960 420" font-family="sans-serif">
<rect width="960" height="420" fill="#ffffff"/>`;

function bumpRow(x0: number, marks: (bump: number) => [number, number][]) {
	let s = '';
	for (let b = 0; b < 5; b++) {
		const x = x0 + b * 80;
		s += `<rect x="${x}" y="110" width="50" height="200" rx="4" fill="#d8c9a8" stroke="#6b5a35" stroke-width="2"/>`;
		for (const [dx, dy] of marks(b))
			s += `<circle cx="${x + dx}" cy="${110 + dy}" r="5" fill="#3a3a3a"/>`;
	}
	return s;
}

const good = () => {
	const pts: [number, number][] = [];
	for (let k = 0; k < 9; k++)
		pts.push([12 + (k % 3) * 13, 30 + Math.floor(k / 3) * 60 + (k % 2) * 12]);
	return pts;
};
const poor = (b: number) =>
	[
		[15, 20],
		[33, 34],
		[22, 48]
	].slice(0, 2 + (b % 2)) as [number, number][];

export const INDENTATION_SVG = `${SVG_HEAD}
<text x="40" y="60" font-size="30" font-weight="bold" fill="#1d6338">GOOD</text>
<text x="520" y="60" font-size="30" font-weight="bold" fill="#972424">POOR</text>
${bumpRow(40, good)}
${bumpRow(520, poor)}
<text x="40" y="360" font-size="20" fill="#222">many even marks on every bump</text>
<text x="520" y="360" font-size="20" fill="#222">few marks, only at one end</text>
<text x="40" y="395" font-size="16" fill="#555">Schematic, not to scale</text>
</svg>`;

export const BUFFER_PATH_SVG = `${SVG_HEAD}
<circle cx="140" cy="250" r="70" fill="#e6eaef" stroke="#343f50" stroke-width="4"/>
<circle cx="820" cy="250" r="70" fill="#e6eaef" stroke="#343f50" stroke-width="4"/>
<rect x="400" y="80" width="160" height="120" fill="#f9a123" stroke="#7d380e" stroke-width="4"/>
<text x="480" y="150" font-size="24" text-anchor="middle" font-weight="bold">HEAD</text>
<path d="M140 180 L380 215 L580 215 L820 180" fill="none" stroke="#299d98" stroke-width="6"/>
<rect x="360" y="250" width="240" height="40" fill="#cbd3dc" stroke="#343f50" stroke-width="3"/>
<text x="480" y="277" font-size="18" text-anchor="middle">stage / part</text>
<text x="140" y="355" font-size="20" text-anchor="middle">supply reel</text>
<text x="820" y="355" font-size="20" text-anchor="middle">take-up reel</text>
<text x="480" y="245" font-size="18" text-anchor="middle" fill="#1d6564">buffer sheet</text>
<path d="M620 150 l40 0 l-10 -8 m10 8 l-10 8" stroke="#343f50" stroke-width="3" fill="none"/>
<text x="480" y="395" font-size="16" text-anchor="middle" fill="#555">Sheet runs flat under the head, no ripples · schematic</text>
</svg>`;

export const PEEL_SVG = `${SVG_HEAD}
<rect x="200" y="260" width="560" height="30" fill="#aee8e3" stroke="#1d6564" stroke-width="3"/>
<text x="480" y="282" font-size="18" text-anchor="middle">glass, clamped flat on sliding table</text>
<rect x="200" y="290" width="560" height="20" fill="#cbd3dc"/>
<path d="M300 258 L520 258 L520 90" fill="none" stroke="#c26306" stroke-width="8"/>
<rect x="495" y="50" width="50" height="40" fill="#343f50"/>
<text x="560" y="78" font-size="20">grip → 50 mm/min</text>
<text x="535" y="200" font-size="22">90°</text>
<text x="330" y="245" font-size="18">FPC (10 mm wide)</text>
<text x="480" y="395" font-size="16" text-anchor="middle" fill="#555">Schematic, not to scale</text>
</svg>`;

const twoRevs = (
	f: (r: 'A' | 'B') => string,
	summaryB: string,
	reasonB: string,
	cls: DemoRevision['classification'] = 'acknowledge',
	daysAgoB = 95
): DemoRevision[] => [
	{
		letter: 'A',
		kind: 'superseded',
		daysAgo: 420,
		summary: 'First issue.',
		reason: 'New instruction for the line start-up.',
		classification: 'retraining',
		source: f('A')
	},
	{
		letter: 'B',
		kind: 'effective',
		daysAgo: daysAgoB,
		summary: summaryB,
		reason: reasonB,
		classification: cls,
		source: f('B')
	}
];

export const DEMO_INSTRUCTIONS: DemoInstruction[] = [
	{
		docNumber: 'WI-ACF-001',
		title: 'ACF reel thaw and floor life',
		process: 'ACF-LAM',
		stations: [],
		reviewDueInDays: 200,
		images: [],
		revisions: twoRevs(
			acfThaw,
			'Thaw time 1 h → 2 h; floor life 7 → 5 days; no re-freezing of opened reels.',
			'Maker data sheet revision for the new ACF type; two open bonds traced to a cold reel.',
			'retraining'
		)
	},
	{
		docNumber: 'WI-COG-004',
		title: 'COG main bond, 1.4" OLED driver chip',
		process: 'COG-MB',
		stations: [],
		reviewDueInDays: 120,
		images: [],
		revisions: [
			{
				letter: 'A',
				kind: 'superseded',
				daysAgo: 400,
				summary: 'First issue.',
				reason: 'Line 1 start-up.',
				classification: 'retraining',
				source: cogMainBond('A')
			},
			{
				letter: 'B',
				kind: 'effective',
				daysAgo: 150,
				summary:
					'Head 180 → 186 °C, pressure 70 → 80 MPa; record the first-bond result on the traveller.',
				reason: 'Process validation PV-L1-017 for the new chip lot.',
				classification: 'retraining',
				source: cogMainBond('B')
			},
			{
				letter: 'C',
				kind: 'in_review',
				daysAgo: 2,
				summary: 'Bond time 8 → 7 s; stop rule after two failed first bonds.',
				reason: 'Cycle time reduction validated in PV-L1-023; stop rule from the 8D on lot 4471.',
				classification: 'retraining',
				source: cogMainBond('C')
			}
		]
	},
	{
		docNumber: 'WI-FOG-002',
		title: 'FOG pre-bond and alignment',
		process: 'FOG-PB',
		stations: [],
		reviewDueInDays: 300,
		images: [],
		revisions: twoRevs(
			fogPreBond,
			'Pre-bond 80 → 90 °C; alignment ± 15 → ± 10 µm using the offset read-out.',
			'Customer complaint on FPC offset; the read-out was added to the pre-bonders.'
		)
	},
	{
		docNumber: 'WI-FOG-003',
		title: 'FOG main bond, 7" automotive LCD',
		process: 'FOG-MB',
		stations: ['L2-FOG-03'],
		reviewDueInDays: 60,
		images: [],
		revisions: [
			{
				letter: 'A',
				kind: 'superseded',
				daysAgo: 380,
				summary: 'First issue.',
				reason: 'Line 2 start-up.',
				classification: 'retraining',
				source: fogMainBond('A').replace('Check recipe', 'Check the recipe name')
			},
			{
				letter: 'B',
				kind: 'effective',
				daysAgo: 180,
				summary: 'Wait for the stage light before taking the part.',
				reason: 'Parts taken too early showed lifted leads.',
				classification: 'acknowledge',
				source: fogMainBond('B')
			},
			{
				letter: 'C',
				kind: 'scheduled',
				daysAgo: -7,
				summary: 'Pressure 3.0 → 3.5 MPa; peel test every 500 parts.',
				reason: 'New FPC supplier with thicker coverlay (PV-L2-009).',
				classification: 'retraining',
				source: fogMainBond('C')
			}
		]
	},
	{
		docNumber: 'WI-GEN-005',
		title: 'Buffer sheet change on main bonders',
		process: null,
		stations: ['L1-COG-01', 'L1-COG-02', 'L1-FOG-02', 'L2-FOG-02', 'L2-FOG-03', 'L2-FOB-01'],
		reviewDueInDays: 30,
		images: [{ name: 'buffer-sheet-path.png', svg: BUFFER_PATH_SVG }],
		revisions: [
			{
				letter: 'A',
				kind: 'effective',
				daysAgo: 260,
				summary: 'First issue.',
				reason: 'Sheet change was only in the machine manual.',
				classification: 'acknowledge',
				source: bufferSheet('A')
			},
			{
				letter: 'B',
				kind: 'draft',
				daysAgo: 1,
				summary: '',
				reason: '',
				classification: 'acknowledge',
				source: bufferSheet('B')
			}
		]
	},
	{
		docNumber: 'WI-CAL-006',
		title: 'Head temperature check per shift',
		process: null,
		stations: ['L1-COG-01', 'L1-COG-02', 'L1-FOG-02', 'L2-FOG-02', 'L2-FOG-03', 'L2-FOB-01'],
		reviewDueInDays: 150,
		images: [],
		revisions: twoRevs(
			headCalibration,
			'Tighter acceptance band (± 3 °C); check the meter calibration sticker.',
			'Internal audit finding IA-2026-04.'
		)
	},
	{
		docNumber: 'WI-INSP-007',
		title: 'Indentation inspection under the DIC microscope',
		process: 'INSP-IND',
		stations: [],
		reviewDueInDays: 90,
		images: [{ name: 'indentation-good-poor.png', svg: INDENTATION_SVG }],
		revisions: twoRevs(
			indentation,
			'Minimum marks per bump 3 → 5; any bridging is a reject.',
			'Customer specification update for the automotive panels.',
			'retraining',
			// Recent, so the demo shows certificates in their retraining grace period.
			6
		)
	},
	{
		docNumber: 'WI-INSP-008',
		title: 'FPC peel test',
		process: 'INSP-IND',
		stations: [],
		reviewDueInDays: 240,
		images: [{ name: 'peel-test-setup.png', svg: PEEL_SVG }],
		revisions: twoRevs(peelTest, 'Minimum peel 6 → 7 N/cm.', 'Customer specification update.')
	},
	{
		docNumber: 'WI-ESD-009',
		title: 'ESD basics at the bonding lines',
		process: 'ESD-BASIC',
		stations: [],
		reviewDueInDays: 330,
		images: [],
		revisions: twoRevs(
			esdBasics,
			'Ionizer check added.',
			'Ionizers installed over all bonders.',
			'acknowledge'
		)
	},
	{
		docNumber: 'WI-ACF-010',
		title: 'Pad cleaning with IPA before lamination',
		process: 'ACF-LAM',
		stations: [],
		reviewDueInDays: 180,
		images: [],
		revisions: twoRevs(
			ipaCleaning,
			'New wipe for the second pass; flash-off 10 → 30 s.',
			'Fibres found under ACF on two panels.'
		)
	}
];
