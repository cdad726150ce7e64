import { ComponentFixture, TestBed } from '@angular/core/testing';
import type { Milestones } from '@evalon/contracts';
import { MilestoneTimeline, loanProgress } from './milestone-timeline';

const milestones: Milestones = {
  shipBy: '2026-12-18',
  deliverBy: '2026-12-22',
  useFrom: '2026-12-28',
  useTo: '2027-01-01',
  returnShipBy: '2027-01-04',
  backAtDepot: '2027-01-06',
  readyAgain: '2027-01-08',
};

describe('loanProgress', () => {
  it('works towards shipping until the unit has left the depot', () => {
    for (const state of ['requested', 'approved', 'confirmed'] as const) {
      // Even after the ship-by day: nothing has shipped until the state says so.
      expect(loanProgress(state, milestones, '2026-12-20')).toEqual({
        current: 'shipBy',
        complete: false,
      });
    }
    expect(loanProgress('shipped', milestones, '2026-12-19').current).toBe('deliverBy');
  });

  it('uses the campus dates while the unit is at the hospital', () => {
    expect(loanProgress('delivered', milestones, '2026-12-23').current).toBe('useFrom');
    expect(loanProgress('delivered', milestones, '2026-12-28').current).toBe('useTo');
    expect(loanProgress('delivered', milestones, '2027-01-01').current).toBe('useTo');
    expect(loanProgress('delivered', milestones, '2027-01-02').current).toBe('returnShipBy');
  });

  it('follows the return, completes when closed and stops on the side exits', () => {
    expect(loanProgress('returning', milestones, '2027-01-05').current).toBe('backAtDepot');
    expect(loanProgress('returned', milestones, '2027-01-07').current).toBe('readyAgain');
    expect(loanProgress('closed', milestones, '2027-01-09')).toEqual({
      current: null,
      complete: true,
    });
    for (const state of ['declined', 'cancelled', 'expired'] as const) {
      expect(loanProgress(state, milestones, '2026-12-01')).toEqual({
        current: null,
        complete: false,
      });
    }
  });
});

describe('MilestoneTimeline', () => {
  let fixture: ComponentFixture<MilestoneTimeline>;

  beforeEach(async () => {
    fixture = TestBed.createComponent(MilestoneTimeline);
    fixture.componentRef.setInput('milestones', milestones);
    fixture.componentRef.setInput('campus', {
      name: 'Velmora Lakefront Campus',
      timeZone: 'America/Chicago',
    });
    fixture.componentRef.setInput('depot', {
      name: 'Quorvel East Depot',
      timeZone: 'America/New_York',
    });
    await fixture.whenStable();
  });

  const steps = () => Array.from(fixture.nativeElement.querySelectorAll('li')) as HTMLElement[];
  const statuses = () =>
    steps().map((li) => ['done', 'current', 'upcoming'].find((s) => li.classList.contains(s)));

  it('lists the seven milestones in order with their days and sites', () => {
    expect(steps().map((li) => li.querySelector('.step-label')!.textContent!.trim())).toEqual([
      'Ship by',
      'Arrives by',
      'First case',
      'Last case',
      'Ships back by',
      'Back at depot',
      'Ready again',
    ]);
    expect(steps()[1]!.querySelector('time')!.getAttribute('datetime')).toBe('2026-12-22');
    expect(steps()[1]!.querySelector('time')!.textContent).toBe('Tue, Dec 22, 2026');
    expect(steps()[0]!.querySelector('.place')!.textContent).toBe('Quorvel East Depot');
    expect(steps()[2]!.querySelector('.place')!.textContent).toBe('Velmora Lakefront Campus');
    // A plan: nothing done, nothing current.
    expect(statuses()).toEqual(Array(7).fill('upcoming'));
  });

  it('names both zones when campus and depot differ', () => {
    expect(fixture.nativeElement.querySelector('.zones').textContent).toBe(
      'Campus days are in America/Chicago (Central Standard Time); depot days in America/New_York (Eastern Standard Time).',
    );
  });

  it('highlights the current step and marks the ones before it done', async () => {
    fixture.componentRef.setInput('current', 'useFrom');
    await fixture.whenStable();
    expect(statuses()).toEqual([
      'done',
      'done',
      'current',
      'upcoming',
      'upcoming',
      'upcoming',
      'upcoming',
    ]);
    const current = fixture.nativeElement.querySelector('[aria-current="step"]') as HTMLElement;
    expect(current.dataset['milestone']).toBe('useFrom');
    expect(current.textContent).toContain('(next step)');
  });

  it('marks everything done for a finished loan', async () => {
    fixture.componentRef.setInput('complete', true);
    await fixture.whenStable();
    expect(statuses()).toEqual(Array(7).fill('done'));
    expect(fixture.nativeElement.querySelector('[aria-current]')).toBeNull();
  });
});
