import { canMove, carrierRank, rankOf, stateForCarrierStatus } from './states';

describe('shipment ladders', () => {
  it('moves only upwards, never back', () => {
    expect(canMove('outbound', 'to_pack', 'packed')).toBe(true);
    expect(canMove('outbound', 'in_transit', 'delivered')).toBe(true);
    expect(canMove('outbound', 'delivered', 'in_transit')).toBe(false);
    expect(canMove('outbound', 'in_transit', 'in_transit')).toBe(false);
    expect(canMove('return', 'awaiting_return', 'handed_over')).toBe(true);
    expect(canMove('return', 'received', 'in_transit')).toBe(false);
    expect(canMove('return', 'to_pack', 'received')).toBe(false);
  });

  it('enters exception only while with the carrier and leaves it only forwards', () => {
    expect(canMove('outbound', 'in_transit', 'exception')).toBe(true);
    expect(canMove('outbound', 'packed', 'exception')).toBe(false);
    expect(canMove('outbound', 'delivered', 'exception')).toBe(false);
    expect(canMove('outbound', 'exception', 'delivered')).toBe(true);
    expect(canMove('outbound', 'exception', 'packed')).toBe(false);
  });

  it('maps carrier statuses onto our states per direction', () => {
    expect(stateForCarrierStatus('outbound', 'picked_up', null)).toBe('in_transit');
    expect(stateForCarrierStatus('outbound', 'delivered', null)).toBe('delivered');
    // A return is received only when the depot scans it in.
    expect(stateForCarrierStatus('return', 'delivered', null)).toBe('in_transit');
    expect(stateForCarrierStatus('outbound', 'exception', 'lost')).toBe('exception');
    expect(stateForCarrierStatus('outbound', 'exception', 'delayed')).toBeNull();
    expect(carrierRank('out_for_delivery')).toBeGreaterThan(carrierRank('in_transit'));
    expect(rankOf('return', 'inspected')).toBe(4);
  });
});
