// The first-visit guide: three steps (pick a starting point, change a value, share the link)
// shown above the page until the visitor dismisses it; the dismissal is remembered in
// localStorage, so later visits start without it. Without storage it shows on every visit.

const GUIDE_KEY = 'ramulus.guide';
const DISMISSED = 'dismissed';

/// Shows `section` unless it was dismissed before; `button` dismisses it for good.
export function showGuide(section, button) {
  section.hidden = readDismissed();
  button.addEventListener('click', () => {
    section.hidden = true;
    try {
      localStorage.setItem(GUIDE_KEY, DISMISSED);
    } catch {
      // Without storage the guide comes back on the next visit.
    }
    document.getElementById('start-from')?.focus();
  });
}

function readDismissed() {
  try {
    return localStorage.getItem(GUIDE_KEY) === DISMISSED;
  } catch {
    return false;
  }
}
