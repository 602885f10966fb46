/** The browser app: the experiment sheet. */
import './ui/page.css';
import './ui/ff-sheet.ts';
