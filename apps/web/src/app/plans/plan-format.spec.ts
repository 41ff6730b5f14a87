import { groupedNotes, limitWindows, middayTopUpBuses } from './plan-format';
import { planResult } from './plan-fixtures';

describe('plan format', () => {
  it('says a note that applies to several buses once, naming them', () => {
    const notes = groupedNotes([
      'The peaks so far are for another period.',
      'Bus 203: no state of charge was entered for its 16:30 pull-in; 55 % is estimated from miles.',
      'Bus 201: no state of charge was entered for its 16:00 pull-in; 62 % is estimated from miles.',
      'Bus 202: no state of charge was entered for its 16:15 pull-in; 58 % is estimated from miles.',
      'Bus 210 is out of service and is left out.',
    ]);
    expect(notes).toEqual([
      'The peaks so far are for another period.',
      'Buses 201, 202 and 203: no state of charge was entered at their pull-in; their arrival charge is estimated from the miles of their runs.',
      'Bus 210 is out of service and is left out.',
    ]);
  });

  it('finds the buses that leave at their ceiling and count on the midday layover', () => {
    expect(
      middayTopUpBuses([
        'Bus 217 needs 230 kWh with reserve for what follows its 06:12 pull-out, above its ceiling (176 kWh): it leaves at the ceiling and relies on the midday layover.',
        'Bus 201: no state of charge was entered for its 16:00 pull-in; 62 % is estimated from miles.',
      ]),
    ).toEqual(['217']);
  });

  it('tells the service limit from a load-reduction window that lowers it', () => {
    const base = planResult();
    const slots = base.slots.map((s, i) => ({ ...s, limitKw: i === 1 || i === 2 ? 100 : 150 }));
    expect(limitWindows({ slots }, 'America/Chicago')).toEqual({
      serviceKw: 150,
      lowered: [{ from: '18:15', to: '18:45', limitKw: 100 }],
      before: null,
    });
    expect(limitWindows(base, 'America/Chicago').lowered).toEqual([]);
  });

  it('gives a plan made from a cut-off the limit it plans under, the one of the slots kept before it apart', () => {
    // The service limit was lowered from 150 to 100 kW before the night was planned again from
    // its third slot: 100 kW is the service limit, not a load-reduction window to the night's end.
    const base = planResult();
    const slots = base.slots.map((s, i) => ({ ...s, limitKw: i < 2 ? 150 : 100 }));
    const replan = { from: slots[2]!.start };
    expect(limitWindows({ slots, replan }, 'America/Chicago')).toEqual({
      serviceKw: 100,
      lowered: [],
      before: { limitKw: 150, until: '18:30' },
    });
  });
});
