// Entry point of the dashboard bundle: defining the root element starts everything.
import './app/syncring-app.js';
