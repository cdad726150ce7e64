import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/** The cautions Evalon shows wherever work touches patients or devices. */
export type CautionTopic =
  'certification' | 'device-use' | 'de-identified' | 'estimates' | 'local-rules';

interface Caution {
  readonly topic: CautionTopic;
  readonly icon: string;
  readonly text: string;
}

/** Every caution in the order they read best together. */
export const cautions: readonly Caution[] = [
  {
    topic: 'certification',
    icon: 'verified_user',
    text: 'Evalon schedules and documents; it does not certify anyone. Credentialing and privileges are granted by the hospital under local rules, and Evalon only records them.',
  },
  {
    topic: 'device-use',
    icon: 'medical_services',
    text: 'Loaned devices are used only by trained clinicians, following the manufacturer’s instructions for use. Reprocessing follows those instructions and local sterile-processing policy.',
  },
  {
    topic: 'de-identified',
    icon: 'shield',
    text: 'Case records are de-identified: never enter patient names, record numbers or dates of birth.',
  },
  {
    topic: 'estimates',
    icon: 'edit_calendar',
    text: 'Computed dates and deposits are estimates until the lender confirms them.',
  },
  {
    topic: 'local-rules',
    icon: 'policy',
    text: 'Local regulations, contracts and licensed practice always come first.',
  },
];

/** A calm block of cautions; pages pick the topics that apply to them. */
@Component({
  selector: 'ev-cautions',
  imports: [MatIconModule],
  template: `
    <h2 [id]="headingId">{{ heading() }}</h2>
    <ul>
      @for (caution of shown(); track caution.topic) {
        <li>
          <mat-icon aria-hidden="true">{{ caution.icon }}</mat-icon>
          <span>{{ caution.text }}</span>
        </li>
      }
    </ul>
  `,
  styleUrl: './cautions.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { role: 'note', '[attr.aria-labelledby]': 'headingId' },
})
export class Cautions {
  private static nextId = 0;
  protected readonly headingId = `ev-cautions-${Cautions.nextId++}`;

  /** Heading above the list. */
  readonly heading = input('Good to know');
  /** Which cautions to show; all of them by default. */
  readonly topics = input<readonly CautionTopic[] | null>(null);

  protected readonly shown = computed(() => {
    const topics = this.topics();
    return topics ? cautions.filter((c) => topics.includes(c.topic)) : cautions;
  });
}
