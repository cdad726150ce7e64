import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient } from '@angular/common/http';
import { provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCardHarness } from '@angular/material/card/testing';
import { provideRouter } from '@angular/router';
import type { Membership } from '@evalon/contracts';
import { SessionStore } from '../../core/session-store';
import { membership, person } from '../../testing/people';
import { Home, greetingFor } from './home';

describe('Home', () => {
  async function render(memberships: Membership[]) {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    TestBed.inject(SessionStore).setUser(person(memberships));
    const fixture = TestBed.createComponent(Home);
    const loader: HarnessLoader = TestbedHarnessEnvironment.loader(fixture);
    await fixture.whenStable();
    return { fixture, loader, text: () => fixture.nativeElement.textContent as string };
  }

  async function cardTexts(loader: HarnessLoader): Promise<string[]> {
    const cards = await loader.getAllHarnesses(MatCardHarness);
    return Promise.all(cards.map((c) => c.getText()));
  }

  it('greets the person by first name with the organisation and role', async () => {
    const { fixture } = await render([membership('harbourview', 'buyer')]);
    const header = fixture.nativeElement.querySelector('ev-page-header');
    expect(header.querySelector('h1').textContent).toMatch(
      /^Good (morning|afternoon|evening), Dana$/,
    );
    expect(header.textContent).toContain('Harbourview Health · Hospital network · Hospital buyer');
  });

  it('gives a buyer loan and proctoring steps with empty states, plus Members', async () => {
    const { loader } = await render([membership('harbourview', 'buyer')]);
    const cards = await cardTexts(loader);
    expect(cards).toHaveLength(3);
    expect(cards[0]).toContain('No evaluation loans yet');
    expect(cards[1]).toContain('No proctoring visits booked');
    expect(cards[2]).toContain('Members');
    const findEquipment = await loader.getHarness(
      MatButtonHarness.with({ text: /Find equipment/ }),
    );
    expect(await (await findEquipment.host()).getAttribute('href')).toBe('/equipment');
  });

  it('gives a coordinator shipment steps and no Members card', async () => {
    const { loader } = await render([membership('meridian', 'coordinator')]);
    const cards = await cardTexts(loader);
    expect(cards.map((c) => c.includes('No shipments to pack today'))).toContain(true);
    expect(cards.some((c) => c.includes('Members'))).toBe(false);
  });

  it('explains what to do without any organisation', async () => {
    const { text } = await render([]);
    expect(text()).toContain('You aren’t part of an organisation yet');
  });

  it('shows the cautions in plain words', async () => {
    const { text } = await render([membership('harbourview', 'clinician')]);
    expect(text()).toContain('it does not certify anyone');
    expect(text()).toContain('manufacturer’s instructions for use');
    expect(text()).toContain('Case records are de-identified');
    expect(text()).toContain('estimates until the lender confirms');
    expect(text()).toContain(
      'Local regulations, contracts and licensed practice always come first.',
    );
  });
});

describe('greetingFor', () => {
  it('splits the day at 5:00, 12:00 and 18:00 (common practice for greetings)', () => {
    expect([4, 5, 11, 12, 17, 18, 23].map(greetingFor)).toEqual([
      'Good evening',
      'Good morning',
      'Good morning',
      'Good afternoon',
      'Good afternoon',
      'Good evening',
      'Good evening',
    ]);
  });
});
