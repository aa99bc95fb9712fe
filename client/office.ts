// Office pages' entry: their stylesheet plus two progressive enhancements that stay out of
// inline handlers (the CSP allows only our own scripts). Pages work without this script.
import './styles/office.css';

// <form data-confirm="Delete this ranch?"> asks before submitting.
document.addEventListener('submit', (event) => {
  const form = event.target;
  if (!(form instanceof HTMLFormElement)) return;
  const question = form.dataset.confirm;
  if (question && !window.confirm(question)) event.preventDefault();
});

// <button type="button" data-print> opens the print dialog.
document.addEventListener('click', (event) => {
  const target = event.target instanceof Element ? event.target.closest('[data-print]') : null;
  if (target) window.print();
});
