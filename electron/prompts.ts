/**
 * The questions main asks with a native message box, as plain data (text, buttons, what each
 * answer means), so their wording and meaning are tested without Electron.
 */
export interface MessagePrompt<A extends string> {
  type: 'warning' | 'question' | 'info';
  message: string;
  detail: string;
  buttons: string[];
  defaultId: number;
  cancelId: number;
  /** The meaning of each button, by index. */
  answers: readonly A[];
}

export type ChangedOnDiskAnswer = 'overwrite' | 'reload' | 'saveAs' | 'cancel';

/**
 * The plan file changed on disk (another program, another copy of the app, a sync tool) since this
 * window opened or saved it. Cancel is the default: nothing is written until the user chooses.
 */
export function changedOnDiskPrompt(fileName: string, removed: boolean): MessagePrompt<ChangedOnDiskAnswer> {
  if (removed) {
    return {
      type: 'warning',
      message: `"${fileName}" was moved or deleted by another program since you opened or saved it.`,
      detail: 'Save Here writes your version to that place again. Save As keeps it under another name.',
      buttons: ['Save Here', 'Save As…', 'Cancel'],
      defaultId: 2,
      cancelId: 2,
      answers: ['overwrite', 'saveAs', 'cancel'],
    };
  }
  return {
    type: 'warning',
    message: `"${fileName}" was changed by another program since you opened or saved it.`,
    detail:
      'Overwrite replaces that version with yours (it is kept as the .bak copy beside the file). ' +
      'Reload from Disk shows that version instead and drops your unsaved changes. Save As keeps both.',
    buttons: ['Overwrite', 'Reload from Disk', 'Save As…', 'Cancel'],
    defaultId: 3,
    cancelId: 3,
    answers: ['overwrite', 'reload', 'saveAs', 'cancel'],
  };
}

/** The answer for a message box response index; anything unexpected is Cancel. */
export function answerOf<A extends string>(prompt: MessagePrompt<A>, response: number, fallback: A): A {
  return prompt.answers[response] ?? fallback;
}
