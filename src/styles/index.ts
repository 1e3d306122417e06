import './fonts';
import './palette.css';
import './base.css';
