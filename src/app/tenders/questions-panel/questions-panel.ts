import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, type FormGroupDirective } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { answerInputSchema, questionInputSchema, type QuestionView } from '@shared/procedure';
import type { TenderView } from '@shared/tenders';
import { Auth } from '../../core/auth/auth';
import { formSubmission, type FormSubmission } from '../../ui/form-submission';
import { fieldMessage, zodValidator } from '../../ui/zod-validator';
import { localClosingTime, minuteClock } from '../closing-time';
import { ProcedureApi } from '../procedure-api';

/**
 * Clarifications of a tender. Vendors: the published questions and answers (numbered, no asker),
 * their own questions awaiting an answer, and a form to ask until the clarification deadline. Buyer,
 * compliance and admin: every question with who asked; the buyer answers while the tender is open.
 */
@Component({
  selector: 'app-questions-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  templateUrl: './questions-panel.html',
  styleUrl: './questions-panel.scss',
})
export class QuestionsPanel {
  private readonly api = inject(ProcedureApi);
  private readonly auth = inject(Auth);
  private readonly destroyRef = inject(DestroyRef);

  readonly tender = input.required<TenderView>();

  protected readonly questions = rxResource({ params: () => this.tender().id, stream: ({ params }) => this.api.questions(params) });
  protected readonly published = computed(() => (this.questions.value() ?? []).filter((q) => q.status === 'answered'));
  protected readonly waiting = computed(() => (this.questions.value() ?? []).filter((q) => q.status === 'asked'));
  protected readonly isVendor = computed(() => this.auth.user()?.role === 'vendor');
  protected readonly isBuyer = computed(() => this.auth.user()?.role === 'buyer');
  private readonly now = minuteClock();
  protected readonly deadline = computed(() => localClosingTime(this.tender().clarificationsCloseAt, this.tender().timeZone));
  protected readonly canAsk = computed(() =>
    this.isVendor() && this.tender().status === 'open' && new Date(this.tender().clarificationsCloseAt).getTime() > this.now());
  protected readonly canAnswer = computed(() => this.isBuyer() && this.tender().status === 'open');

  protected readonly question = new FormControl('', { nonNullable: true, validators: zodValidator(questionInputSchema.shape.text) });
  protected readonly askForm = new FormGroup({ text: this.question });
  protected readonly asking = formSubmission(this.askForm);
  /** One answer draft (a form of its own, sent on its own) per question id. */
  private readonly answers = new Map<string, AnswerDraft>();
  protected readonly status = signal('');
  protected readonly fieldMessage = fieldMessage;
  /** Times of the procedure are shown in its time zone, named. */
  protected readonly when = (iso: string) => localClosingTime(iso, this.tender().timeZone);

  protected answerDraft(q: QuestionView): AnswerDraft {
    let draft = this.answers.get(q.id);
    if (!draft) {
      const form = new FormGroup({ text: new FormControl('', { nonNullable: true, validators: zodValidator(answerInputSchema.shape.text) }) });
      draft = { form, submission: formSubmission(form, this.destroyRef) };
      this.answers.set(q.id, draft);
    }
    return draft;
  }

  protected ask(directive: FormGroupDirective): void {
    this.asking.send(
      () => this.api.ask(this.tender().id, this.question.value),
      () => {
        // Through the directive: a plain reset would leave the form "submitted", its field in error.
        directive.resetForm();
        this.status.set('Your question was sent to the buyer. Its answer will be published to every invited vendor.');
        this.questions.reload();
      },
      () => this.questions.reload(),
    );
  }

  protected answer(q: QuestionView): void {
    const { form, submission } = this.answerDraft(q);
    submission.send(
      () => this.api.answer(q.id, form.controls.text.value),
      (answered) => {
        this.answers.delete(q.id);
        this.status.set(`Clarification ${answered.number} is published and e-mailed to every invited vendor.`);
        this.questions.reload();
      },
      () => this.questions.reload(),
    );
  }
}

interface AnswerDraft {
  form: FormGroup<{ text: FormControl<string> }>;
  submission: FormSubmission;
}
